// Issue 18, one schema per form: each converted form's action parses with the schema its page
// validates with (app/forms/), answers bad input with a 400, a field error and the values typed
// (passwords never), and takes good input as before.
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { getPreferences } from "~/.server/alerts/pages";
import { action as settingsAction } from "~/routes/settings";
import { action as siteAlertsAction } from "~/routes/site.alerts";
import { action as waterAction } from "~/routes/water";
import { listWaterChecks } from "~/.server/water";
import { action as wishlistAction } from "~/routes/wishlist";
import { action as plantAction } from "~/routes/plants.$plantKey";
import { siteWishlist } from "~/.server/plants";
import { action as watchAction } from "~/routes/spots.$spotId.alerts";
import { listRules } from "~/.server/alerts/pages";
import { action as membersAction } from "~/routes/members";
import { action as spotAction } from "~/routes/spots.$spotId";
import { siteInventory } from "~/.server/plants";
import { addMember, makeSite, makeSpot, makeUser, useMailSink } from "./helpers";

useMailSink();

type Fn = (a: never) => unknown;
type Reply = {
  status?: string;
  initialValue?: Record<string, unknown> | null;
  error?: Record<string, string[] | null> | null;
};

/** The action's answer as status and body; a thrown 400 counts as an answer too. */
async function call(fn: Fn, request: Request, params: Record<string, string> = {}) {
  try {
    const r = await fn({ request, params, context: {} } as never);
    if (r instanceof Response) return { status: r.status, body: null as never };
    const d = r as { type?: string; data?: unknown; init?: { status?: number } | null };
    if (d && d.type === "DataWithResponseInit") return { status: d.init?.status ?? 200, body: d.data as never };
    return { status: 200, body: r as never };
  } catch (e) {
    if (e instanceof Response) return { status: e.status, body: null as never };
    const x = e as { type?: string; data?: unknown; init?: { status?: number } | null };
    if (x?.type === "DataWithResponseInit") return { status: x.init?.status ?? 500, body: x.data as never };
    throw e;
  }
}

function post(token: string, path: string, form: Record<string, string | string[]>) {
  const body = new URLSearchParams();
  for (const [k, v] of Object.entries(form)) for (const x of [v].flat()) body.append(k, x);
  return new Request(`http://127.0.0.1${path}`, {
    method: "POST",
    headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
    body,
  });
}

async function signedIn() {
  const user = await makeUser({ password: "the old password 1" });
  const token = generateSessionToken();
  await createSession(token, user.id);
  return { user, token };
}

describe("settings", () => {
  it("a too-short new password is a 400 on that field, with neither password sent back; an unknown unit is refused on its field", async () => {
    const { token } = await signedIn();
    const short = await call(
      settingsAction as Fn,
      post(token, "/settings", { intent: "password", current: "the old password 1", next: "short" }),
    );
    expect(short.status).toBe(400);
    const reply = (short.body as { intent: string; result: Reply }).result;
    expect(reply.error?.next).toEqual(["Use at least 10 characters"]);
    expect(reply.initialValue).not.toHaveProperty("current");
    expect(reply.initialValue).not.toHaveProperty("next");

    const wrong = await call(
      settingsAction as Fn,
      post(token, "/settings", { intent: "password", current: "not it", next: "a new password 2" }),
    );
    expect(wrong.status).toBe(400);
    expect((wrong.body as { result: Reply }).result.error?.current).toEqual(["Your current password is not right."]);

    const kelvin = await call(settingsAction as Fn, post(token, "/settings", { intent: "unit", unit: "K" }));
    expect(kelvin.status).toBe(400);
    expect((kelvin.body as { result: Reply }).result.error?.unit).toEqual(["Choose °C or °F"]);
    expect((await call(settingsAction as Fn, post(token, "/settings", { intent: "unit", unit: "F" }))).body).toEqual({
      saved: "unit",
    });
    expect((await call(settingsAction as Fn, post(token, "/settings", { intent: "nonsense" }))).status).toBe(400);
  });
});

describe("alert e-mails", () => {
  it("a quiet hour like 25:99 is an error on its field with every box and time typed sent back; good values are saved", async () => {
    const { user, token } = await signedIn();
    const site = await makeSite(user);
    const params = { siteId: String(site.id) };
    const typed = { intent: "preferences", email: "on", kinds: ["cold", "dry"], quietFrom: "25:99", quietTo: "07:00" };
    const bad = await call(siteAlertsAction as Fn, post(token, "/", typed), params);
    expect(bad.status).toBe(400);
    const reply = (bad.body as { result: Reply }).result;
    expect(reply.error?.quietFrom).toEqual(["Enter quiet hours as times like 22:30."]);
    expect(reply.initialValue).toMatchObject({
      email: "on",
      kinds: ["cold", "dry"],
      quietFrom: "25:99",
      quietTo: "07:00",
    });

    const oneEnd = await call(
      siteAlertsAction as Fn,
      post(token, "/", { ...typed, quietFrom: "22:30", quietTo: "" }),
      params,
    );
    expect((oneEnd.body as { result: Reply }).result.error?.quietTo).toEqual([
      "Give both ends of the quiet hours, or neither.",
    ]);

    expect(
      (await call(siteAlertsAction as Fn, post(token, "/", { ...typed, quietFrom: "22:30" }), params)).body,
    ).toEqual({ savedPrefs: true });
    expect(await getPreferences(user.id, site.id, "owner")).toMatchObject({
      email: true,
      kinds: ["cold", "dry"],
      quietFrom: 22 * 60 + 30,
      quietTo: 7 * 60,
    });
  });
});

describe("water checks", () => {
  it(
    "an own source without a name and a pH of 15 are errors on " +
      "their fields, every value typed is sent back and nothing is " +
      "stored; a decimal comma still reads",
    async () => {
      const { user, token } = await signedIn();
      const site = await makeSite(user);
      const params = { siteId: String(site.id) };
      const typed = {
        intent: "log",
        source: "other",
        ownSource: "",
        checkedOn: "2025-05-01",
        measure: "ec",
        value: "150",
        scale: "0.7",
        ph: "15",
      };
      const bad = await call(waterAction as Fn, post(token, "/", typed), params);
      expect(bad.status).toBe(400);
      const reply = (bad.body as { result: Reply }).result;
      expect(reply.error?.ph).toEqual(["pH is between 0 and 14."]);
      expect(reply.initialValue).toMatchObject({
        source: "other",
        checkedOn: "2025-05-01",
        measure: "ec",
        value: "150",
        scale: "0.7",
        ph: "15",
      });
      const noName = await call(waterAction as Fn, post(token, "/", { ...typed, ph: "6,5" }), params);
      expect((noName.body as { result: Reply }).result.error?.ownSource).toEqual([
        "Name the water source (up to 40 characters), or choose tap, rain or filtered.",
      ]);
      const future = await call(
        waterAction as Fn,
        post(token, "/", { ...typed, ownSource: "Water butt", ph: "6,5", checkedOn: "2999-01-01" }),
        params,
      );
      expect((future.body as { result: Reply }).result.error?.checkedOn).toEqual(["The date cannot be in the future."]);
      expect(await listWaterChecks(site.id)).toHaveLength(0);

      expect(
        (await call(waterAction as Fn, post(token, "/", { ...typed, ownSource: "Water butt", ph: "6,5" }), params))
          .body,
      ).toMatchObject({ ok: true, source: "Water butt" });
      expect((await listWaterChecks(site.id)).map((c) => [c.source, c.ec, c.ecScale, c.ph])).toEqual([
        ["Water butt", 150, 0.7, 6.5],
      ]);
    },
  );
});

describe("wishes", () => {
  it(
    "0 pots on the wishlist or a plant's page is an error on the " +
      "pots with the plant and must-have kept; an unknown plant is " +
      "refused on its field",
    async () => {
      const { user, token } = await signedIn();
      const site = await makeSite(user);
      const params = { siteId: String(site.id) };
      const bad = await call(
        wishlistAction as Fn,
        post(token, "/", { intent: "save", plantKey: "hoya", pots: "0", mustHave: "on" }),
        params,
      );
      expect(bad.status).toBe(400);
      const reply = bad.body as { plantKey: string; result: Reply };
      expect(reply.plantKey).toBe("hoya");
      expect(reply.result.error?.pots).toEqual(["At least one pot"]);
      expect(reply.result.initialValue).toMatchObject({ plantKey: "hoya", pots: "0", mustHave: "on" });
      const unknown = await call(
        wishlistAction as Fn,
        post(token, "/", { intent: "save", plantKey: "no-such-plant", pots: "1" }),
        params,
      );
      expect((unknown.body as { result: Reply }).result.error?.plantKey).toEqual(["Choose a plant from the list."]);
      expect(await siteWishlist(site.id)).toHaveLength(0);

      const onPage = await call(plantAction as Fn, post(token, "/", { intent: "wish", pots: "1.5" }), {
        ...params,
        plantKey: "hoya",
      });
      expect(onPage.status).toBe(400);
      expect((onPage.body as { result: Reply }).result.error?.pots).toEqual(["Whole pots only"]);

      expect(
        (
          await call(
            wishlistAction as Fn,
            post(token, "/", { intent: "save", plantKey: "hoya", pots: "3", mustHave: "on" }),
            params,
          )
        ).body,
      ).toEqual({ saved: "hoya", restored: null });
      expect(
        (
          await call(plantAction as Fn, post(token, "/", { intent: "wish", pots: "2" }), {
            ...params,
            plantKey: "hoya",
          })
        ).body,
      ).toEqual({ saved: true });
      expect((await siteWishlist(site.id)).map((w) => [w.plantKey, w.mustHave, w.pots])).toEqual([["hoya", false, 2]]);
      expect(
        (await call(wishlistAction as Fn, post(token, "/", { intent: "remove", plantKey: "x".repeat(500) }), params))
          .status,
      ).toBe(400);
    },
  );
});

describe("watches", () => {
  it(
    "a threshold that is not a number and a dry-air line of 120 % " +
      "are errors on their fields with the typed values kept; a change " +
      "keeps the stored kind",
    async () => {
      const { user, token } = await signedIn();
      const site = await makeSite(user);
      const spot = await makeSpot(site);
      const params = { siteId: String(site.id), spotId: String(spot.id) };
      const typed = {
        intent: "add",
        kind: "dry",
        threshold: "forty",
        durationMinutes: "30",
        hysteresis: "5",
        clearMinutes: "30",
      };
      const bad = await call(watchAction as Fn, post(token, "/", typed), params);
      expect(bad.status).toBe(400);
      const reply = bad.body as { ruleId: string; kind: string; result: Reply };
      expect([reply.ruleId, reply.kind]).toEqual(["new", "dry"]);
      expect(reply.result.error?.threshold).toEqual(["Enter the threshold as a number."]);
      expect(reply.result.initialValue).toMatchObject({ kind: "dry", threshold: "forty", durationMinutes: "30" });
      const over = await call(watchAction as Fn, post(token, "/", { ...typed, threshold: "120" }), params);
      expect((over.body as { result: Reply }).result.error?.threshold).toEqual([
        "Enter a percentage between 0 and 100.",
      ]);
      const noDuration = await call(
        watchAction as Fn,
        post(token, "/", { ...typed, threshold: "40", durationMinutes: "" }),
        params,
      );
      expect((noDuration.body as { result: Reply }).result.error?.durationMinutes).toEqual([
        "Minutes before the alert: a whole number from 0 to 1,440.",
      ]);
      expect(await listRules(spot.id)).toHaveLength(0);

      expect((await call(watchAction as Fn, post(token, "/", { ...typed, threshold: "40,5" }), params)).status).toBe(
        200,
      );
      const [dry] = await listRules(spot.id);
      expect([dry.kind, dry.threshold]).toEqual(["dry", 40.5]);
      // The page cannot turn a dry-air watch into a silent one: the stored kind's limits apply.
      const change = await call(
        watchAction as Fn,
        post(token, "/", {
          intent: "update",
          ruleId: String(dry.id),
          kind: "silent",
          threshold: "500",
          durationMinutes: "30",
          hysteresis: "5",
          clearMinutes: "30",
        }),
        params,
      );
      expect(change.status).toBe(400);
      expect((change.body as { ruleId: string; result: Reply }).ruleId).toBe(String(dry.id));
      expect((change.body as { result: Reply }).result.error?.threshold).toEqual([
        "Enter a percentage between 0 and 100.",
      ]);
      expect((await call(watchAction as Fn, post(token, "/", { intent: "pause", ruleId: "0" }), params)).status).toBe(
        400,
      );
    },
  );
});

describe("members", () => {
  it(
    "an invitation to a broken address is an error on the address " +
      "with the address and role typed sent back; a role that does not " +
      "exist is refused beside the member",
    async () => {
      const { user, token } = await signedIn();
      const site = await makeSite(user);
      const carer = await makeUser();
      await addMember(site, carer, "carer");
      const params = { siteId: String(site.id) };
      const bad = await call(
        membersAction as Fn,
        post(token, "/", { intent: "invite", email: "someone@", role: "mentor" }),
        params,
      );
      expect(bad.status).toBe(400);
      const reply = (bad.body as { result: Reply }).result;
      expect(reply.error?.email).toEqual(["That is not an e-mail address"]);
      expect(reply.initialValue).toMatchObject({ email: "someone@", role: "mentor" });
      const owner = await call(
        membersAction as Fn,
        post(token, "/", { intent: "invite", email: "friend@example.test", role: "owner" }),
        params,
      );
      expect((owner.body as { result: Reply }).result.error?.role).toEqual(["Choose carer or mentor"]);

      const role = await call(
        membersAction as Fn,
        post(token, "/", { intent: "role", userId: String(carer.id), role: "gardener" }),
        params,
      );
      expect(role).toEqual({ status: 400, body: { intent: "role", error: "Choose a role.", userId: carer.id } });
      expect(
        (
          await call(
            membersAction as Fn,
            post(token, "/", { intent: "role", userId: String(carer.id), role: "mentor" }),
            params,
          )
        ).body,
      ).toEqual({ intent: "role", ok: true, userId: carer.id });
      expect(
        (
          await call(
            membersAction as Fn,
            post(token, "/", { intent: "invite", email: " Friend@Example.test ", role: "carer" }),
            params,
          )
        ).body,
      ).toEqual({ intent: "invite", invited: "friend@example.test" });
    },
  );
});

describe("plants in a spot", () => {
  it(
    "a nickname of 61 characters is an error on it with the plant " +
      "and pots typed sent back, a NUL in one is dropped, and a move " +
      "without a spot is refused",
    async () => {
      const { user, token } = await signedIn();
      const site = await makeSite(user);
      const spot = await makeSpot(site);
      const params = { siteId: String(site.id), spotId: String(spot.id) };
      const bad = await call(
        spotAction as Fn,
        post(token, "/", { intent: "plant-add", plantKey: "hoya", nickname: "n".repeat(61), pots: "3" }),
        params,
      );
      expect(bad.status).toBe(400);
      const reply = (bad.body as { plantResult: Reply }).plantResult;
      expect(reply.error?.nickname).toEqual(["Keep the name under 60 characters"]);
      expect(reply.initialValue).toMatchObject({ plantKey: "hoya", pots: "3" });
      const unknown = await call(
        spotAction as Fn,
        post(token, "/", { intent: "plant-add", plantKey: "no-such-plant", pots: "1" }),
        params,
      );
      expect((unknown.body as { plantResult: Reply }).plantResult.error?.plantKey).toEqual([
        "Choose a plant from the list.",
      ]);
      expect(await siteInventory(site.id)).toHaveLength(0);

      expect(
        (
          await call(
            spotAction as Fn,
            post(token, "/", { intent: "plant-add", plantKey: "hoya", nickname: "the pink\u0000 one", pots: "3" }),
            params,
          )
        ).status,
      ).toBe(200);
      const [row] = await siteInventory(site.id);
      expect([row.plantKey, row.nickname, row.pots]).toEqual(["hoya", "the pink one", 3]);
      const move = await call(
        spotAction as Fn,
        post(token, "/", { intent: "plant-move", id: String(row.id), toSpotId: "" }),
        params,
      );
      expect(move).toEqual({ status: 400, body: { plantError: "Choose the spot to move it to." } });
    },
  );
});
