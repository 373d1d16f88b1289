import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
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
        <meta name="theme-color" content="#f8f4ec" />
        <link rel="icon" href="/favicon.svg" type="image/svg+xml" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-dvh">
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
  let title = "Something went wrong";
  let detail = "The page could not be shown. Your data is safe; try again in a moment.";
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? "Not found" : `${error.status} ${error.statusText || ""}`.trim();
    detail =
      error.status === 404
        ? "There is nothing here, or it belongs to a site you are not a member of."
        : typeof error.data === "string"
          ? error.data
          : detail;
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <main className="mx-auto max-w-xl px-5 py-16">
      <h1 className="h1">{title}</h1>
      <p className="mt-3 text-muted">{detail}</p>
      <a href="/" className="link mt-6 inline-block">
        Back to my sites
      </a>
    </main>
  );
}
