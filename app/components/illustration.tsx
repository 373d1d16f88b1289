// Nichewise's one drawing (docs/design.md): three niches in a wall — a sunny windowsill, a shelf
// with an orchid in flower, and a spot at night with its watch lamp lit — under the sun's path
// through the twelve months, high in summer and low in winter. Decoration only: it carries no
// reading, so it is hidden from screen readers unless a page gives it words.

/** The sun's noon height over a year at about 52° N, January to December, as 0 (lowest) to 1 (highest). */
const SUN_HEIGHT = [0.08, 0.3, 0.56, 0.82, 0.97, 1, 0.97, 0.82, 0.56, 0.3, 0.08, 0];

export function SpotsAndSeasons({ className, title }: { className?: string; title?: string }) {
  const named = title ? { role: "img", "aria-label": title } : { "aria-hidden": true as const };
  const arch = (x: number, w: number, top: number) => `M${x} 140V${top + w / 2}a${w / 2} ${w / 2} 0 0 1 ${w} 0V140z`;
  return (
    <svg viewBox="0 0 320 158" className={className} {...named} data-testid="spots-and-seasons">
      {title ? <title>{title}</title> : null}
      {/* the year: twelve suns, their height the noon sun's in each month */}
      <path
        d="M22 48C80 48 110 12 160 12S240 48 298 48"
        fill="none"
        stroke="var(--color-stone-line)"
        strokeDasharray="2 3"
      />
      {SUN_HEIGHT.map((h, i) => {
        const x = 30 + i * (260 / 11);
        const y = 46 - h * 34;
        const summer = h > 0.5;
        return (
          <circle
            key={i}
            cx={x}
            cy={y}
            r={summer ? 4 + h * 2 : 3.2}
            fill={summer ? "var(--color-day)" : h > 0.2 ? "var(--color-dawn)" : "var(--color-dusk)"}
            opacity={summer ? 1 : 0.85}
          />
        );
      })}
      {/* the wall */}
      <rect x="8" y="62" width="304" height="80" fill="var(--color-stone)" />
      <path d="M4 142h312" stroke="var(--color-night)" strokeWidth="3" strokeLinecap="round" />

      {/* 1: a windowsill by day */}
      <path d={arch(30, 72, 66)} fill="var(--color-dusk-soft)" stroke="var(--color-night)" strokeWidth="1.6" />
      <path d="M66 68v62M30 104h72" stroke="var(--color-card)" strokeWidth="2.5" />
      <circle cx="86" cy="90" r="7" fill="var(--color-day)" />
      <path d="M26 130h80v5H26z" fill="var(--color-card)" stroke="var(--color-night)" strokeWidth="1.4" />
      <path d="M58 130l2 -9h12l2 9z" fill="var(--color-dawn)" stroke="var(--color-night)" strokeWidth="1.2" />
      <path d="M66 121c-6-2-10-8-8-15 5 2 8 7 8 15zM66 121c5-3 8-8 6-13-4 2-6 7-6 13z" fill="var(--color-leaf)" />

      {/* 2: a shelf with an orchid in flower */}
      <path d={arch(124, 72, 66)} fill="var(--color-card)" stroke="var(--color-night)" strokeWidth="1.6" />
      <path d="M124 124h72" stroke="var(--color-night)" strokeWidth="2" />
      <path d="M148 124l2 -10h20l2 10z" fill="var(--color-card)" stroke="var(--color-night)" strokeWidth="1.2" />
      <path d="M160 114c-9 0-15-3-18-7 7-2 14 0 18 7zM160 114c8-1 13-4 15-8-6-1-12 1-15 8z" fill="var(--color-leaf)" />
      <path d="M161 112c0-14 4-24 14-28" fill="none" stroke="var(--color-leaf)" strokeWidth="1.4" />
      {[
        [175, 84],
        [169, 92],
        [180, 95],
      ].map(([x, y]) => (
        <g key={`${x}-${y}`} fill="var(--color-dawn)" stroke="var(--color-night)" strokeWidth="0.6">
          <circle cx={x - 2.6} cy={y} r="2.8" />
          <circle cx={x + 2.6} cy={y} r="2.8" />
          <circle cx={x} cy={y - 2.6} r="2.6" />
          <circle cx={x} cy={y + 2.2} r="2.2" fill="var(--color-day)" />
        </g>
      ))}

      {/* 3: a spot at night, its watch lamp lit */}
      <path d={arch(218, 72, 66)} fill="var(--color-night)" stroke="var(--color-night)" strokeWidth="1.6" />
      <path d="M268 86a7 7 0 1 0 6 10 6 6 0 0 1 -6 -10z" fill="var(--color-card)" />
      {[
        [234, 84],
        [246, 98],
        [232, 110],
      ].map(([x, y]) => (
        <circle key={`${x}-${y}`} cx={x} cy={y} r="1" fill="var(--color-card)" />
      ))}
      <path d="M248 130l2 -9h12l2 9z" fill="var(--color-card)" stroke="var(--color-card)" strokeWidth="0.8" />
      <path
        d="M256 121c-6-2-10-8-8-15 5 2 8 7 8 15zM256 121c5-3 8-8 6-13-4 2-6 7-6 13z"
        fill="var(--color-leaf)"
        stroke="var(--color-card)"
        strokeWidth="0.5"
      />
      <path d="M280 112c2 2.2 3 3.8 3 5.3a3 3 0 0 1-6 0c0-1.5 1-3.1 3-5.3z" fill="var(--color-day)" />
      <path d="M276 124h8" stroke="var(--color-day)" strokeWidth="1.6" strokeLinecap="round" />
      <path d="M214 130h80v5h-80z" fill="var(--color-card)" stroke="var(--color-night)" strokeWidth="1.4" />
    </svg>
  );
}
