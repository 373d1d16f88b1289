// A fit reason's twelve months as a row of small niches (docs/design.md): filled where the spot
// passes, half filled where it asks for care, crossed where it fails, dotted where nothing was
// measured; a projected month has a dashed outline and a lighter fill. Shapes, not colour alone,
// carry the meaning; the whole strip is named for screen readers ("Cold nights: fails in Dec, …").
import { decodeStrip, MONTH_SHORT, stripLabel, type StripCell } from "~/domain/fit/month-strip";

const NICHE = "M2 15V8a6 6 0 0 1 12 0v7z";
const TONE: Record<StripCell["state"], string> = {
  pass: "var(--color-v-thrives)",
  care: "var(--color-v-care)",
  fail: "var(--color-v-struggles)",
  unmeasured: "var(--color-v-unknown)",
};

function Cell({ cell, x }: { cell: StripCell; x: number }) {
  const c = TONE[cell.state];
  const fillOpacity = cell.projected ? 0.45 : 1;
  return (
    <g transform={`translate(${x} 0)`} color={c} data-state={cell.state} data-projected={cell.projected || undefined}>
      <path
        d={NICHE}
        fill="none"
        stroke={c}
        strokeWidth="1.3"
        strokeDasharray={cell.projected || cell.state === "unmeasured" ? "2 1.6" : undefined}
      />
      {cell.state === "pass" ? <path d={NICHE} fill={c} fillOpacity={fillOpacity} /> : null}
      {cell.state === "care" ? <path d="M2 15v-5h12v5z" fill={c} fillOpacity={fillOpacity} /> : null}
      {cell.state === "fail" ? (
        <path
          d="M4.5 6l7 7M11.5 6l-7 7"
          stroke={c}
          strokeWidth="1.7"
          strokeLinecap="round"
          opacity={cell.projected ? 0.7 : 1}
        />
      ) : null}
      {cell.state === "unmeasured" ? <circle cx="8" cy="10.5" r="1.2" fill={c} /> : null}
      <text x="8" y="27.5" textAnchor="middle" fontSize="9" fill="var(--color-muted)">
        {MONTH_SHORT[cell.month - 1].slice(0, 1)}
      </text>
    </g>
  );
}

export function MonthStrip({ rule, code }: { rule: string; code: string }) {
  const cells = decodeStrip(code);
  if (cells.length !== 12) return null;
  const label = stripLabel(rule, cells);
  return (
    <svg
      viewBox="0 0 240 30"
      width="240"
      height="30"
      className="mt-1 block max-w-full"
      role="img"
      aria-label={label}
      data-testid="month-strip"
      data-rule={rule}
    >
      <title>{label}</title>
      {cells.map((c, i) => (
        <Cell key={c.month} cell={c} x={i * 20 + 2} />
      ))}
    </svg>
  );
}

/** The strip's key, once above a list of reasons. */
export function MonthStripKey() {
  const sample: [StripCell, string][] = [
    [{ month: 1, state: "pass", projected: false }, "passes"],
    [{ month: 1, state: "care", projected: false }, "asks for care"],
    [{ month: 1, state: "fail", projected: false }, "fails"],
    [{ month: 1, state: "unmeasured", projected: false }, "not measured"],
    [{ month: 1, state: "pass", projected: true }, "dashed: projected"],
  ];
  return (
    <ul
      className="flex flex-wrap gap-x-3 gap-y-1 text-xs text-muted"
      aria-label="What a reason's month strip shows"
      data-testid="month-strip-key"
    >
      {sample.map(([c, words]) => (
        <li key={words} className="inline-flex items-center gap-1">
          <svg viewBox="0 0 16 17" width="12" height="13" aria-hidden="true">
            <Cell cell={c} x={0} />
          </svg>
          {words}
        </li>
      ))}
    </ul>
  );
}
