import { Form, Link, NavLink, Outlet } from "react-router";
import { requireUser } from "~/.server/auth";
import type { Route } from "./+types/shell";
import { NichewiseMark } from "~/components/icons";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { user };
}

export default function Shell({ loaderData }: Route.ComponentProps) {
  const { user } = loaderData;
  return (
    <div className="min-h-dvh">
      <header className="border-b border-stone-line bg-card">
        <div className="day-band" aria-hidden="true" />
        <div className="mx-auto flex max-w-6xl items-center gap-4 px-4 py-3 sm:px-6">
          <Link to="/" className="inline-flex items-center gap-2 text-lg font-bold tracking-[-0.02em] text-ink">
            <NichewiseMark size={24} />
            Nichewise
          </Link>
          <nav className="ml-auto flex items-center gap-1 text-sm">
            {user.isAdmin ? (
              <NavLink to="/admin" className="rounded-md px-2 py-1.5 text-muted hover:text-ink aria-[current=page]:text-ink">
                Ingest health
              </NavLink>
            ) : null}
            <NavLink to="/settings" className="rounded-md px-2 py-1.5 text-muted hover:text-ink aria-[current=page]:text-ink">
              {user.name}
            </NavLink>
            <Form method="post" action="/sign-out">
              <button className="rounded-md px-2 py-1.5 text-muted hover:text-ink">Sign out</button>
            </Form>
          </nav>
        </div>
      </header>
      <div id="main" tabIndex={-1} className="outline-none">
        <Outlet />
      </div>
    </div>
  );
}
