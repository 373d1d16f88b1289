// Nichewise's own small icons (docs/design.md): drawn on a 20-unit grid with a 1.6 stroke in the
// current colour, round joins, and the niche arch wherever a place is meant. Decorative beside words
// (aria-hidden), never the only carrier of a meaning.
import type { ReactNode, SVGProps } from "react";

type IconProps = Omit<SVGProps<SVGSVGElement>, "children"> & { size?: number };

function Icon({ size = 18, children, className, ...rest }: IconProps & { children: ReactNode }) {
  return (
    <svg
      viewBox="0 0 20 20"
      width={size}
      height={size}
      fill="none"
      stroke="currentColor"
      strokeWidth="1.6"
      strokeLinecap="round"
      strokeLinejoin="round"
      aria-hidden="true"
      focusable="false"
      className={`inline-block shrink-0 ${className ?? ""}`}
      {...rest}
    >
      {children}
    </svg>
  );
}

/** The mark: a niche with a leaf standing in it and the sun over its arch. */
export function NichewiseMark(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 18V9a6 6 0 0 1 12 0v9z" />
      <path d="M2.5 18h15" />
      <path d="M10 17v-5.5M10 13.2c-2.3 0-3.4-1.3-3.4-3.1 2.1 0 3.4 1 3.4 3.1zM10 12.2c1.9 0 3-1.1 3-2.7-1.8 0-3 .9-3 2.7z" />
      <circle cx="10" cy="3" r="0.9" fill="var(--color-day)" stroke="var(--color-day)" />
    </Icon>
  );
}

export type SpotKind = "windowsill" | "shelf" | "balcony" | "bench" | "case";

/** A windowsill: the window's arch over a sill. */
export function WindowsillIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M5 15V7a5 5 0 0 1 10 0v8" />
      <path d="M10 2v13M5 9h10" />
      <path d="M3 15h14v2H3z" />
    </Icon>
  );
}

/** A shelf on a wall: two boards on brackets. */
export function ShelfIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M3 8h14M3 15h14" />
      <path d="M5 8l2 2.5M15 8l-2 2.5M5 15l2 2.5M15 15l-2 2.5" />
      <path d="M8.5 8V5.5h3V8" />
    </Icon>
  );
}

/** A balcony: a rail of uprights under open sky. */
export function BalconyIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M2.5 10h15M2.5 17h15" />
      <path d="M5 10v7M8.3 10v7M11.7 10v7M15 10v7" />
      <path d="M12 5.5a2 2 0 1 1 4 0" />
    </Icon>
  );
}

/** An outdoor bench: two back slats, a seat and legs, with a leaf blowing over it. */
export function BenchIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 7.5h12M4 10h12M2.5 13h15" />
      <path d="M4.5 7.5V17M15.5 7.5V17" />
      <path d="M12.5 4.8c1.2-1.9 3.2-2.4 5-2-.3 2-2 3.3-5 2zM12.5 4.8l2.3-1" />
    </Icon>
  );
}

/** A case or small greenhouse: a glazed arch with a ridge. */
export function CaseIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M3 17V9.5a7 5 0 0 1 14 0V17z" />
      <path d="M10 4.6V17M3 12h14" />
    </Icon>
  );
}

const KIND_ICON: Record<SpotKind, (p: IconProps) => ReactNode> = {
  windowsill: WindowsillIcon,
  shelf: ShelfIcon,
  balcony: BalconyIcon,
  bench: BenchIcon,
  case: CaseIcon,
};

export const SPOT_KIND_WORDS: Record<SpotKind, string> = {
  windowsill: "windowsill",
  shelf: "shelf",
  balcony: "balcony",
  bench: "outdoor bench",
  case: "case or greenhouse",
};

/** Which drawing suits a spot, read from its name (a spot has no kind of its own): a picture, not a fact. */
export function spotKindOf(name: string, indoor: boolean): SpotKind {
  const n = name.toLowerCase();
  if (/\b(case|cabinet|terrarium|vivarium|greenhouse|glasshouse|wardian|tent|orchidarium)\b/.test(n)) return "case";
  if (/\b(sill|window|windowsill|bay)\b/.test(n)) return "windowsill";
  if (/\b(balcony|terrace|veranda|porch)\b/.test(n)) return "balcony";
  if (/\b(bench|garden|tree|patio|yard|outdoor|outside)\b/.test(n) || !indoor) return "bench";
  return "shelf";
}

export function SpotKindIcon({ name, indoor, ...props }: IconProps & { name: string; indoor: boolean }) {
  const Kind = KIND_ICON[spotKindOf(name, indoor)];
  return <Kind {...props} />;
}

/** A sensor: a small box with its vent slots and a signal arc. */
export function SensorIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <rect x="4" y="7" width="9" height="10" rx="1.2" />
      <path d="M6.5 10.5h4M6.5 13.5h4" />
      <path d="M15 5.5a4 4 0 0 1 0 5M16.8 3.5a7 7 0 0 1 0 9" />
    </Icon>
  );
}

/** An alert watch: the lamp lit in the niche (the same lamp as the watch states). */
export function WatchIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 18V9a6 6 0 0 1 12 0v9z" />
      <path d="M10 8.2c1.3 1.4 1.8 2.4 1.8 3.4a1.8 1.8 0 0 1-3.6 0c0-1 .5-2 1.8-3.4z" fill="currentColor" />
      <path d="M8 16h4" />
    </Icon>
  );
}

/** Water: a drop with a level line. */
export function WaterIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M10 2.5c3.4 4 5 6.7 5 9.2a5 5 0 0 1-10 0c0-2.5 1.6-5.2 5-9.2z" />
      <path d="M7.5 12.5a2.6 2.6 0 0 0 2.5 2.3" />
    </Icon>
  );
}

/** A plant: two leaves out of a pot with a rim. */
export function PlantIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M5.5 12.5h9l-1.2 5h-6.6z" />
      <path d="M4.8 12.5h10.4" />
      <path d="M10 12.5V7M10 9.5C7 9.5 5.5 7.8 5.5 5.2 8.3 5.2 10 6.6 10 9.5zM10 8c2.4 0 3.8-1.5 3.8-3.8-2.3 0-3.8 1.3-3.8 3.8z" />
    </Icon>
  );
}

/** A note: a card with its corner turned and two lines. */
export function NoteIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 3h9l3 3v11H4z" />
      <path d="M13 3v3h3M7 9.5h6M7 12.5h4.5" />
    </Icon>
  );
}

/** Data going into Nichewise (the API's Send and Publish): an arrow down into the niche. */
export function IntoIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 18V9a6 6 0 0 1 12 0v9z" />
      <path d="M10 6.5v7.5M7 11l3 3 3-3" />
    </Icon>
  );
}

/** Data coming out of Nichewise (the API's Read): an arrow up out of the niche. */
export function OutOfIcon(props: IconProps) {
  return (
    <Icon {...props}>
      <path d="M4 18V9a6 6 0 0 1 12 0v9z" />
      <path d="M10 15V7.5M7 10.5l3-3 3 3" />
    </Icon>
  );
}
