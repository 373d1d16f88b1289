// Nichewise's marks for an alert watch and an alert (docs/design.md): the niche again, with a lamp
// lit in it while the watch keeps watch, the lamp out (two bars) while it is paused, and the
// niche with a raised stroke while an alert is open. Always beside the words, never instead.
const NICHE = "M2 15V8a6 6 0 0 1 12 0v7z";

export type WatchStateName = "watching" | "paused" | "open" | "acknowledged";

export function WatchMark({ state, size = 16 }: { state: WatchStateName; size?: number }) {
  return (
    <svg
      viewBox="0 0 16 17"
      width={size}
      height={size}
      className="inline-block shrink-0 align-[-0.15em]"
      aria-hidden="true"
      data-watch={state}
    >
      <path
        d={NICHE}
        fill="none"
        stroke="currentColor"
        strokeWidth="1.4"
        strokeDasharray={state === "paused" ? "2 1.6" : undefined}
      />
      {state === "watching" ? (
        // A lamp in the niche: a flame over a small dish.
        <>
          <path d="M8 6.2c1.3 1.5 1.9 2.6 1.9 3.5a1.9 1.9 0 0 1-3.8 0c0-.9.6-2 1.9-3.5z" fill="currentColor" />
          <path d="M5.2 12.6h5.6" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
        </>
      ) : null}
      {state === "paused" ? (
        <path d="M6.5 7.5v5M9.5 7.5v5" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
      ) : null}
      {state === "open" ? (
        <>
          <path d="M8 5.5v5" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
          <circle cx="8" cy="12.8" r="1.1" fill="currentColor" />
        </>
      ) : null}
      {state === "acknowledged" ? (
        <path
          d="M5 10.2l2.1 2.1L11.2 7.6"
          fill="none"
          stroke="currentColor"
          strokeWidth="1.6"
          strokeLinecap="round"
          strokeLinejoin="round"
        />
      ) : null}
    </svg>
  );
}

const WORDS: Record<"watching" | "paused", { name: string; detail: string; tone: string }> = {
  watching: { name: "Keeping watch", detail: "every reading is checked against its line", tone: "text-ink" },
  paused: { name: "Paused", detail: "no alerts from this watch until it is resumed", tone: "text-care" },
};

/** A watch's state as words with its mark: "Keeping watch — every reading is checked against its line". */
export function WatchState({ paused }: { paused: boolean }) {
  const w = WORDS[paused ? "paused" : "watching"];
  return (
    <p className="flex flex-wrap items-baseline gap-x-1.5 text-sm" data-testid="watch-state">
      <span className={`inline-flex items-center gap-1.5 font-semibold whitespace-nowrap ${w.tone}`}>
        <WatchMark state={paused ? "paused" : "watching"} />
        {w.name}
      </span>
      <span className="text-muted">— {w.detail}</span>
    </p>
  );
}
