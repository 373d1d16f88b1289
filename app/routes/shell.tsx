import { Form, Link, NavLink, Outlet, useRouteLoaderData } from "react-router";
import { RouteError } from "~/components/route-error";
import { requireUser } from "~/.server/auth";
import type { Route } from "./+types/shell";
import { NichewiseMark } from "~/components/icons";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { user };
}

export default function Shell({ loaderData }: Route.ComponentProps) {
  return (
    <ShellFrame user={loaderData.user}>
      <Outlet />
    </ShellFrame>
  );
}

/** A page of the shell that failed keeps the header (when the shell itself loaded) around its error. */
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<typeof loader>("routes/shell");
  const message = (
    <div className="mx-auto max-w-xl px-5 py-16">
      <RouteError error={error} />
    </div>
  );
  return data ? <ShellFrame user={data.user}>{message}</ShellFrame> : <main id="main">{message}</main>;
}

function ShellFrame({ user, children }: { user: { name: string; isAdmin: boolean }; children: React.ReactNode }) {
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
              <NavLink
                to="/admin"
                className="rounded-md px-2 py-1.5 text-muted hover:text-ink aria-[current=page]:text-ink"
              >
                Ingest health
              </NavLink>
            ) : null}
            <NavLink
              to="/settings"
              className="rounded-md px-2 py-1.5 text-muted hover:text-ink aria-[current=page]:text-ink"
            >
              {user.name}
            </NavLink>
            <Form method="post" action="/sign-out">
              <button className="rounded-md px-2 py-1.5 text-muted hover:text-ink">Sign out</button>
            </Form>
          </nav>
        </div>
      </header>
      <div id="main" tabIndex={-1} className="outline-none">
        {children}
      </div>
    </div>
  );
}
