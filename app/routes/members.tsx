import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { listMembers } from "~/.server/sites";
import type { Route } from "./+types/members";

export const meta: Route.MetaFunction = () => [{ title: "People · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const members = await listMembers(siteId);
  // Only owners see e-mail addresses of the other members.
  return { role, members: members.map((m) => ({ ...m, email: role === "owner" ? m.email : null })) };
}

const roleWords = {
  owner: "Owner — manages spots, sensors, people and alerts",
  carer: "Carer — logs water checks, moves sensors and plants, acknowledges alerts",
  mentor: "Mentor — reads everything and leaves notes",
};

export default function Members({ loaderData }: Route.ComponentProps) {
  return (
    <section className="max-w-2xl">
      <p className="mb-4 text-muted">Who shares this site, and what each can do.</p>
      <ul className="divide-y divide-line rounded-2xl border border-line bg-card">
        {loaderData.members.map((m) => (
          <li key={m.userId} className="p-4">
            <p className="font-semibold">{m.name}</p>
            {m.email ? <p className="text-sm text-muted">{m.email}</p> : null}
            <p className="mt-1 text-sm">{roleWords[m.role]}</p>
          </li>
        ))}
      </ul>
    </section>
  );
}
