import { describe, it, expect } from "vitest";
import { describeChange, isMemberChange } from "~/domain/sharing/changes";

describe("describeChange", () => {
  it("says who was invited, promoted, removed", () => {
    expect(describeChange("member.invite", { email: "a@b.test", role: "mentor" })).toBe("invited a@b.test as mentor");
    expect(describeChange("member.role", { name: "Jory", from: "carer", to: "owner" })).toBe(
      "changed Jory from carer to owner",
    );
    expect(describeChange("member.remove", { name: "Jory", role: "carer" })).toBe("removed Jory (carer)");
    expect(describeChange("member.leave", { role: "mentor" })).toBe("left the site (was mentor)");
  });

  it("still shows actions it does not know, in words", () => {
    expect(describeChange("alert.acknowledge", {})).toBe("alert acknowledge");
  });

  it("tells member changes apart", () => {
    expect(isMemberChange("member.join")).toBe(true);
    expect(isMemberChange("spot.update")).toBe(false);
  });
});
