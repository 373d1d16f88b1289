import { Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import { RouteError } from "~/components/route-error";
import type { Route } from "./+types/root";
import { z } from "zod";
import "./app.css";

// In the browser zod would probe for eval (new Function) to compile its parsers, which the
// Content-Security-Policy refuses and reports; it parses the same without. The server keeps it.
if (typeof document !== "undefined") z.config({ jitless: true });

export const meta: Route.MetaFunction = () => [{ title: "Nichewise" }];

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="theme-color" content="#edf1f1" />
        <link rel="icon" href="/favicon.svg" type="image/svg+xml" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-dvh">
        <a href="#main" className="skip-link">
          Skip to the page
        </a>
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return (
    <main id="main" className="mx-auto max-w-xl px-5 py-16">
      <RouteError error={error} />
    </main>
  );
}
