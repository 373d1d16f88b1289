// Nichewise's verdict marks: a niche (an arch-topped recess in a wall) filled as far as the spot
// suits the plant. Always beside the verdict's words, never instead of them (docs/design.md).
import type { ReactNode } from "react";

export type VerdictName =
  "thrives here" | "possible with care" | "good for part of the year" | "struggles here" | "not enough data yet";

const TONE: Record<VerdictName, string> = {
  "thrives here": "text-v-thrives",
  "possible with care": "text-v-care",
  "good for part of the year": "text-v-season",
  "struggles here": "text-v-struggles",
  "not enough data yet": "text-v-unknown",
};

/** The short words used where a whole verdict does not fit (the matrix's key, the answer line). */
export const VERDICT_SHORT: Record<VerdictName, string> = {
  "thrives here": "suits",
  "possible with care": "with care",
  "good for part of the year": "part of the year",
  "struggles here": "not here",
  "not enough data yet": "not judged yet",
};

const NICHE = "M2 15V8a6 6 0 0 1 12 0v7z";

function Fill({ verdict }: { verdict: VerdictName }) {
  switch (verdict) {
    case "thrives here":
      return <path d={NICHE} fill="currentColor" />;
    case "possible with care":
      // Filled to the sill's half: it grows with some help.
      return <path d="M2 15v-5h12v5z" fill="currentColor" />;
    case "good for part of the year":
      // One side filled: for a run of months.
      return <path d="M2 15V8a6 6 0 0 1 6-6v13z" fill="currentColor" />;
    case "struggles here":
      return <path d="M4.5 5.5l7 7M11.5 5.5l-7 7" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />;
    default:
      return <circle cx="8" cy="10" r="1.3" fill="currentColor" />;
  }
}

export function VerdictMark({ verdict, size = 16, title }: { verdict: string; size?: number; title?: string }) {
  const v = (verdict in TONE ? verdict : "not enough data yet") as VerdictName;
  return (
    <svg
      viewBox="0 0 16 17"
      width={size}
      height={size}
      className={`inline-block shrink-0 align-[-0.15em] ${TONE[v]}`}
      role={title ? "img" : undefined}
      aria-label={title}
      aria-hidden={title ? undefined : true}
      data-verdict={v}
    >
      <path
        d={NICHE}
        fill="none"
        stroke="currentColor"
        strokeWidth="1.4"
        strokeDasharray={v === "not enough data yet" ? "2 2" : undefined}
      />
      <Fill verdict={v} />
    </svg>
  );
}

/** The verdict as words first, its mark after. */
export function VerdictWords({ verdict, children }: { verdict: string; children?: ReactNode }) {
  const v = (verdict in TONE ? verdict : "not enough data yet") as VerdictName;
  return (
    <span className={`verdict-words ${TONE[v]}`}>
      <span>{children ?? verdict}</span>
      <VerdictMark verdict={v} />
    </span>
  );
}

export function VerdictKey() {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm" aria-label="What the marks mean">
      {(Object.keys(TONE) as VerdictName[]).map((v) => (
        <li key={v} className="inline-flex items-center gap-1.5">
          <VerdictMark verdict={v} />
          <span>{v}</span>
        </li>
      ))}
    </ul>
  );
}
