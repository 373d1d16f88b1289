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

/**
 * Titles by status in our words. The framework's statusText can be a stale default (a 403 once read
 * "403 Internal Server Error"), so the code alone decides the title.
 */
export const STATUS_TITLES: Record<number, string> = {
  400: "That request could not be read",
  401: "Sign in first",
  403: "Not allowed",
  404: "Not found",
  405: "Not something this page does",
  409: "Already changed",
  413: "Too large",
  415: "Not a kind of file this page takes",
  429: "Too many requests: wait a moment",
  503: "Busy: try again in a moment",
};

export const statusTitle = (status: number) => STATUS_TITLES[status] ?? (status >= 500 ? "Something went wrong" : "That did not work");

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "The page could not be shown. Your data is safe; try again in a moment.";
  if (isRouteErrorResponse(error)) {
    title = statusTitle(error.status);
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
    <main id="main" className="mx-auto max-w-xl px-5 py-16">
      <title>{`${title} · Nichewise`}</title>
      <h1 className="h1">{title}</h1>
      <p className="mt-3 text-muted">{detail}</p>
      <a href="/" className="link mt-6 inline-block">
        Back to my sites
      </a>
    </main>
  );
}
