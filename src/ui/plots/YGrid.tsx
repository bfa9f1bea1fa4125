/** Horizontal grid lines with their labels at the left edge of a plot: one per y tick. */
export function YGrid({
  ticks,
  y,
  left,
  right,
  label,
}: {
  ticks: number[];
  /** Tick value → pixel row. */
  y: (t: number) => number;
  /** Pixel columns where the grid starts and ends. */
  left: number;
  right: number;
  label: (t: number) => string;
}) {
  return ticks.map((t) => (
    <g key={`y${t}`}>
      <line x1={left} x2={right} y1={y(t)} y2={y(t)} className="grid" />
      <text x={left - 6} y={y(t) + 4} textAnchor="end" className="tick">
        {label(t)}
      </text>
    </g>
  ));
}
