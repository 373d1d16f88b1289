import type { WaterVerdict } from "~/domain/water/verdict";

// Water verdicts in Nichewise's own marks (docs/design.md): a drop, filled when the water suits
// routine watering, filled to half when it needs attention, crossed when it does not suit. Beside the words.
export const WATER_VERDICT: Record<WaterVerdict, { word: string; cls: string }> = {
  good: { word: "Good for routine watering", cls: "text-v-thrives" },
  adjust: { word: "Needs attention", cls: "text-v-care" },
  avoid: { word: "Not for routine watering", cls: "text-v-struggles" },
};

const DROP = "M8 1.8C5.6 5 3.5 7.6 3.5 10.2a4.5 4.5 0 0 0 9 0C12.5 7.6 10.4 5 8 1.8z";
export function DropMark({ verdict }: { verdict: WaterVerdict }) {
  return (
    <svg
      viewBox="0 0 16 16"
      width="14"
      height="14"
      className="mr-1 inline-block align-[-0.1em]"
      aria-hidden="true"
      data-water={verdict}
    >
      <path d={DROP} fill={verdict === "good" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.4" />
      {verdict === "adjust" ? <path d="M3.6 10.2h8.8a4.4 4.4 0 0 1-8.8 0z" fill="currentColor" /> : null}
      {verdict === "avoid" ? (
        <path d="M5.8 8l4.4 4.4M10.2 8l-4.4 4.4" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
      ) : null}
    </svg>
  );
}

/** One colour per water source on the chart. */
export const WATER_SOURCE_COLOURS = ["#3b6ea8", "#a9502b", "#3f7a4a", "#a87514", "#6f4fa0", "#2f8a8a"];
