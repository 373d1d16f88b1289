// One message read with a topic's mapping, by the preset module of its format.
import { bleGateway } from "./ble-gateway";
import { custom } from "./custom";
import { plainNumber } from "./esphome";
import { shelly } from "./shelly";
import { tasmota } from "./tasmota";
import type { DecodeContext, DecodeResult, Mapping } from "./types";
import { zigbee2mqtt } from "./zigbee2mqtt";

/** Reads one message with a topic's mapping. Items of other devices are left for the caller to drop. */
export function decodePayload(bytes: Uint8Array, mapping: Mapping, ctx: DecodeContext): DecodeResult {
  switch (mapping.preset) {
    case "zigbee2mqtt":
      return zigbee2mqtt(bytes, ctx);
    case "tasmota":
      return tasmota(bytes, ctx);
    case "esphome":
      return plainNumber(bytes, mapping);
    case "shelly":
      return shelly(bytes);
    case "ble-gateway":
      return bleGateway(bytes);
    case "custom":
      return custom(bytes, mapping, ctx);
  }
}
