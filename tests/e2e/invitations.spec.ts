// The invitation round trip through the real SMTP sink: the owner invites a mentor, the e-mail is
// read back from the sink (admin-only API), the link opens, the invitee creates an account, joins as
// mentor, can read and leave notes, and cannot change anything else.
import { request as playwrightRequest } from "@playwright/test";
import { test, expect, signIn, DEMO } from "./fixtures";

async function linkFromSink(baseURL: string, to: string) {
  const admin = await playwrightRequest.newContext({ baseURL, maxRedirects: 0 });
  expect((await admin.post("/sign-in", { form: DEMO.admin })).status()).toBe(302);
  let links: string[] = [];
  await expect
    .poll(async () => {
      const res = await admin.get(`/api/admin/mail?to=${encodeURIComponent(to)}`);
      const body = (await res.json()) as { mail: { subject: string; links: string[] }[] };
      links = body.mail[0]?.links ?? [];
      return body.mail[0]?.subject ?? "";
    })
    .toMatch(/invites you to "Hollins Lane"/);
  await admin.dispose();
  return links.find((l) => l.includes("/invite/"))!;
}

test("invite → e-mail → link → sign up → joined as mentor → can read, cannot edit", async ({
  page,
  browser,
  baseURL,
}) => {
  const email = `new-mentor-${Date.now()}@example.test`;
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/members");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel(/^Mentor/).check();
  await page.getByRole("button", { name: "Send invitation" }).click();
  await expect(page.getByRole("status")).toContainText(`Invitation sent to ${email}`);
  await expect(page.getByTestId("invitations")).toContainText(email);

  const link = await linkFromSink(baseURL!, email);
  expect(link).toMatch(/\/invite\/[a-z2-7]{20,}$/);

  const context = await browser.newContext();
  const guest = await context.newPage();
  const errors: string[] = [];
  guest.on("console", (m) => m.type() === "error" && errors.push(m.text()));
  await guest.goto(new URL(link).pathname);
  await expect(guest.getByRole("heading", { name: "Join Hollins Lane" })).toBeVisible();
  await expect(guest.getByText("as a mentor")).toBeVisible();
  await guest.getByRole("link", { name: "Create an account" }).click();
  await expect(guest.getByLabel("E-mail")).toHaveValue(email);
  await guest.getByLabel("Your name").fill("Morwenna Test");
  await guest.getByLabel("Password").fill("a mentor's password");
  await guest.getByRole("button", { name: "Create account" }).click();
  // Back on the invitation, signed in now.
  await guest.getByRole("button", { name: "Join Hollins Lane" }).click();
  await expect(guest).toHaveURL(/\/sites\/1$/);
  await expect(guest.getByText("Mentor — you can read everything here and leave notes")).toBeVisible();

  // Reads: the spots, a spot page with its notes, the water checks.
  await guest
    .getByRole("link", { name: /Landing sill/ })
    .first()
    .click();
  await expect(guest.getByRole("heading", { name: "Landing sill (south-west)" })).toBeVisible();
  await expect(guest.getByTestId("notes-panel")).toContainText("Hettie Marlowe");
  await expect(guest.getByRole("link", { name: "Edit spot" })).toHaveCount(0);
  await expect(guest.getByRole("heading", { name: "Place a sensor here" })).toHaveCount(0);
  // A mentor may leave a note, shown with their name.
  await guest.getByLabel("Leave a note on this spot").fill("Try a Masdevallia here in winter.");
  await guest.getByRole("button", { name: "Add note" }).click();
  await expect(guest.getByTestId("notes-panel")).toContainText("Try a Masdevallia here in winter.");
  await expect(guest.getByTestId("notes-panel")).toContainText("Morwenna Test");
  await expect(guest.getByRole("button", { name: "Mark resolved" })).toHaveCount(0);

  await guest.getByRole("link", { name: "Water" }).click();
  await expect(guest.getByTestId("water-sources")).toContainText("Tap water");
  await expect(guest.getByRole("button", { name: "Save check" })).toHaveCount(0);

  // Cannot edit: the server refuses a mentor's writes outright.
  const spotId = guest.url().match(/spots\/(\d+)/)?.[1] ?? "1";
  for (const [url, form] of [
    ["/sites/1/spots/new", { name: "Mentor's spot", indoor: "indoor", facing: "none", capacity: "1" }],
    ["/sites/1/water", { intent: "log", source: "tap", checkedOn: "2026-01-01", measure: "ppm", value: "50", ph: "6" }],
    ["/sites/1/members", { intent: "invite", email: "x@example.test", role: "carer" }],
    [`/sites/1/spots/${spotId}`, { intent: "place", sensorId: "1" }],
    ["/api/sites/1/notes", { intent: "resolve", noteId: "1" }],
  ] as const) {
    const res = await guest.request.post(url, { form: form as Record<string, string>, maxRedirects: 0 });
    expect(res.status(), `POST ${url}`).toBe(403);
  }

  // The link worked once.
  await guest.goto(new URL(link).pathname);
  await expect(guest.getByText("This invitation has already been used.")).toBeVisible();
  expect(errors).toEqual([]);
  await context.close();

  // The owner sees who joined, and the note, in what changed.
  await page.goto("/sites/1/members");
  await expect(page.getByTestId("members")).toContainText("Morwenna Test");
  await expect(page.getByTestId("changes")).toContainText("Morwenna Test joined as mentor");
  await expect(page.getByTestId("changes")).toContainText(`invited ${email} as mentor`);
});

test("the last owner cannot step down or leave; roles change from the People page", async ({ page }) => {
  await signIn(page, DEMO.owner);
  await page.goto("/sites/1/members");
  // The page says why, and does not offer it…
  await expect(page.getByLabel("Role of Wren Ashdown")).toBeDisabled();
  await expect(
    page.getByText("The only owner: make someone else an owner before stepping down or leaving."),
  ).toBeVisible();
  await expect(page.getByRole("button", { name: "Leave this site" })).toBeDisabled();
  // …and the server refuses it anyway.
  const me = await page.request.post("/sites/1/members", { form: { intent: "leave" }, maxRedirects: 0 });
  expect(me.status()).toBe(400);
  expect(await me.text()).toContain("You are the only owner");

  // Jory: carer → mentor → carer, both in what changed.
  for (const [from, to] of [
    ["carer", "mentor"],
    ["mentor", "carer"],
  ]) {
    await page.getByLabel("Role of Jory Ashdown").selectOption(to);
    await page
      .getByRole("listitem")
      .filter({ hasText: "Jory Ashdown" })
      .getByRole("button", { name: "Change role" })
      .click();
    await expect(page.getByTestId("changes")).toContainText(`changed Jory Ashdown from ${from} to ${to}`);
  }
});
