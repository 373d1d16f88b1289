// Names the engine uses for topics (RabbitMQ's MQTT plugin maps "/" to "." and "." to "/"), and the
// commit announcements the alert lease's holder reads: malformed parts are skipped, never thrown on.
import { describe, expect, it } from "vitest";
import { parseSpans } from "~/.server/cluster/alerts";
import { routingKeyToTopic, topicToRoutingKey } from "~/.server/cluster/config";

describe("routing keys and MQTT topics", () => {
  it("maps both ways as RabbitMQ's MQTT plugin does", () => {
    expect(topicToRoutingKey("nichewise/sensors/12/reading")).toBe("nichewise.sensors.12.reading");
    expect(routingKeyToTopic("nichewise.sensors.12.reading")).toBe("nichewise/sensors/12/reading");
    // A dot inside an MQTT topic level travels as "/" in the routing key.
    expect(routingKeyToTopic("nichewise.sensors.12.v1/2")).toBe("nichewise/sensors/12/v1.2");
  });
});

describe("commit announcements", () => {
  it("reads spot and time spans and skips what is malformed", () => {
    expect(parseSpans("4:1000:2000,7:5:5")).toEqual([
      [4, 1000, 2000],
      [7, 5, 5],
    ]);
    expect(parseSpans("4:2000:1000,x:1:2,:,,9:1")).toEqual([]);
    expect(parseSpans("a".repeat(10_000))).toEqual([]);
  });
});
