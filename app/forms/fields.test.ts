import { describe, expect, it } from "vitest";
import { parseWithZod } from "@conform-to/zod/v4";
import { z } from "zod";
import { checkbox, decimal, INT4_MAX, rowId, text, whole } from "~/forms/fields";

const form = (entries: Record<string, string>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(entries)) f.set(k, v);
  return f;
};

// The field builders through conform, as every form parses: what app/.server/ids.ts promised for
// hand-read fields (int4 ids, NUL-free text) holds for schema fields too.
describe("form field builders", () => {
  const schema = z.object({
    id: rowId(),
    note: text(10).optional(),
    ph: decimal("pH is between 0 and 14.", 0, 14).optional(),
    n: whole("Whole minutes", 0, 1440).optional(),
    on: checkbox(),
  });
  const parse = (entries: Record<string, string>) => {
    const s = parseWithZod(form(entries), { schema });
    return {
      status: s.status,
      value: s.status === "success" ? s.value : undefined,
      error: s.status === "error" ? s.error : undefined,
    };
  };

  it("takes a plain positive int4 id and nothing else", () => {
    expect(parse({ id: "42" })).toMatchObject({ status: "success", value: { id: 42, on: false } });
    for (const bad of ["0", "-1", "1e3", "0x10", " 7x", String(INT4_MAX + 1), "99999999999"]) {
      expect(parse({ id: bad }).status, bad).toBe("error");
    }
    expect(parse({ id: String(INT4_MAX) }).status).toBe("success");
  });

  it("drops NUL and other controls from text, trims it and bounds its length", () => {
    expect(parse({ id: "1", note: " a\u0000b\u0007c " })).toMatchObject({ value: { note: "abc" } });
    expect(parse({ id: "1", note: "x".repeat(11) }).error).toMatchObject({ note: ["Keep it under 10 characters"] });
  });

  it("reads a decimal comma, refuses words and out-of-range numbers with the field's own message", () => {
    expect(parse({ id: "1", ph: "6,5" })).toMatchObject({ value: { ph: 6.5 } });
    expect(parse({ id: "1", ph: "six" }).error).toMatchObject({ ph: ["pH is between 0 and 14."] });
    expect(parse({ id: "1", ph: "14.5" }).error).toMatchObject({ ph: ["pH is between 0 and 14."] });
    expect(parse({ id: "1", n: "1.5" }).error).toMatchObject({ n: ["Whole minutes"] });
    expect(parse({ id: "1", n: "30", on: "on" })).toMatchObject({ value: { n: 30, on: true } });
  });
});
