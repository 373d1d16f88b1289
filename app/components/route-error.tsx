import { isRouteErrorResponse } from "react-router";

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

export const statusTitle = (status: number) =>
  STATUS_TITLES[status] ?? (status >= 500 ? "Something went wrong" : "That did not work");

/** What a route's error boundary says about `error`: a title and a sentence, never a stack. */
export function describeRouteError(error: unknown): { title: string; detail: string } {
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
  return { title, detail };
}

/**
 * The error in a layout's place for its page: the layout's boundary keeps what it can of the layout
 * (the menu) around this. `level` is the heading's: 1 alone on a page, 2 under a site's name.
 */
export function RouteError({ error, level = 1, home = "/" }: { error: unknown; level?: 1 | 2; home?: string }) {
  const { title, detail } = describeRouteError(error);
  const Heading = level === 1 ? "h1" : "h2";
  return (
    <div data-testid="route-error">
      {/* Under a layout the layout's meta names the page (with the error's title). */}
      {level === 1 ? <title>{`${title} · Nichewise`}</title> : null}
      <Heading className={level === 1 ? "h1" : "h2"}>{title}</Heading>
      <p className="mt-3 text-muted">{detail}</p>
      <a href={home} className="link mt-6 inline-block">
        {home === "/" ? "Back to my sites" : "Back to this site's spots"}
      </a>
    </div>
  );
}
