// The members page: invite someone, withdraw an invitation, change a member's role, remove a
// member, leave the site. One action, a discriminated union on `intent`.
import { z } from "zod";
import { INVITABLE_ROLES, ROLES } from "~/domain/vocabulary";
import { rowId } from "~/forms/fields";

export const inviteSchema = z.object({
  intent: z.literal("invite"),
  // Not cleaned: an address with a control character in it is refused, not changed.
  email: z
    .string({ error: "Enter an e-mail address" })
    .trim()
    .toLowerCase()
    .max(320, "That is not an e-mail address")
    .pipe(z.email("That is not an e-mail address")),
  role: z.enum(INVITABLE_ROLES, { error: "Choose carer or mentor" }),
});

const member = rowId("Choose a member.");

export const membersSchema = z.discriminatedUnion(
  "intent",
  [
    inviteSchema,
    z.object({
      intent: z.literal("revoke"),
      invitationId: rowId("Choose an invitation; reload the page and try again."),
    }),
    z.object({ intent: z.literal("role"), userId: member, role: z.enum(ROLES, { error: "Choose a role." }) }),
    z.object({ intent: z.literal("remove"), userId: member }),
    z.object({ intent: z.literal("leave") }),
  ],
  { error: "Unknown action" },
);
