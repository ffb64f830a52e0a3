/**
 * Top view of the hinge post, the leaf and the ram at closed, half and fully open (the angle
 * wanted), with the arc of angles the ram can actually reach. Drawn to scale in SVG.
 */
import type { SwingOperatorGeometryResult } from '@/lib/rules/calculators/swing-geometry';
import type { SwingGeometryValue } from './SwingGeometryPanel';

interface Props {
  input: SwingGeometryValue;
  result: SwingOperatorGeometryResult;
  leafLengthMm: number | null;
}

const POSITIONS = [
  { key: 'closed', label: 'Closed', colour: '#1d2c3f', factor: 0 },
  { key: 'half', label: 'Half', colour: '#6f86a0', factor: 0.5 },
  { key: 'open', label: 'Open', colour: '#c98b16', factor: 1 },
] as const;

const rad = (deg: number) => (deg * Math.PI) / 180;

export function SwingTopView({ input, result, leafLengthMm }: Props) {
  // The leaf is drawn as far as it matters to the operator; a long leaf continues (dashed) off the view.
  const leaf = Math.min(leafLengthMm ?? Number.POSITIVE_INFINITY, input.bracketFromHingeMm * 1.35);
  const continues = leafLengthMm === null || leafLengthMm > leaf;
  const rear = { x: -input.aMm, y: input.bMm };
  const poses = POSITIONS.map((p) => {
    const angle = input.targetOpeningDeg * p.factor;
    const c = Math.cos(rad(angle));
    const s = Math.sin(rad(angle));
    return {
      ...p,
      angle,
      leafEnd: { x: leaf * c, y: leaf * s },
      front: { x: input.bracketFromHingeMm * c, y: input.bracketFromHingeMm * s },
    };
  });
  const xs = [0, rear.x, ...poses.flatMap((p) => [p.leafEnd.x * 1.08, p.front.x])];
  const ys = [0, rear.y, ...poses.flatMap((p) => [p.leafEnd.y * 1.08, p.front.y])];
  const extent = Math.max(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys), 1);
  const pad = extent * 0.12;
  const minX = Math.min(...xs) - pad;
  const maxY = Math.max(...ys) + pad;
  const width = Math.max(...xs) - Math.min(...xs) + 2 * pad;
  const height = Math.max(...ys) - Math.min(...ys) + 2 * pad;
  const stroke = extent / 90;
  // World y points up (the side the leaf opens to); SVG y points down.
  const pt = (p: { x: number; y: number }) => `${p.x} ${-p.y}`;
  const r = input.bracketFromHingeMm;
  const arcs = result.reachableRangesDeg.map((range) => {
    const from = { x: r * Math.cos(rad(range.fromDeg)), y: r * Math.sin(rad(range.fromDeg)) };
    const to = { x: r * Math.cos(rad(range.toDeg)), y: r * Math.sin(rad(range.toDeg)) };
    const large = range.toDeg - range.fromDeg > 180 ? 1 : 0;
    return `M ${pt(from)} A ${r} ${r} 0 ${large} 0 ${pt(to)}`;
  });
  const description = `Top view: hinge post at the corner, leaf shown closed, at ${Math.round(input.targetOpeningDeg / 2)}° and at ${input.targetOpeningDeg}°, with the ram from its rear pivot to the leaf bracket. The ram reaches ${
    result.reachableRangesDeg.map((x) => `${x.fromDeg}° to ${x.toDeg}°`).join(' and ') || 'no opening angle'
  }.`;

  return (
    <figure className="m-0">
      <svg
        viewBox={`${minX} ${-maxY} ${width} ${height}`}
        className="h-auto w-full rounded-lg border border-iron-100 bg-iron-50"
        role="img"
        aria-label={description}
      >
        <line
          x1={minX}
          y1={0}
          x2={minX + width}
          y2={0}
          stroke="#c3cfdc"
          strokeWidth={stroke / 2}
          strokeDasharray={`${stroke * 3} ${stroke * 2}`}
        />
        {arcs.map((d, i) => (
          <path
            key={i}
            d={d}
            fill="none"
            stroke="#1f7a45"
            strokeOpacity={0.55}
            strokeWidth={stroke * 2.5}
            strokeLinecap="round"
          />
        ))}
        {poses.map((p) => (
          <g key={p.key}>
            <line
              x1={0}
              y1={0}
              x2={p.leafEnd.x}
              y2={-p.leafEnd.y}
              stroke={p.colour}
              strokeWidth={stroke * 1.6}
              strokeLinecap="round"
            />
            {continues && (
              <line
                x1={p.leafEnd.x}
                y1={-p.leafEnd.y}
                x2={p.leafEnd.x * 1.08}
                y2={-p.leafEnd.y * 1.08}
                stroke={p.colour}
                strokeWidth={stroke * 1.6}
                strokeDasharray={`${stroke} ${stroke}`}
              />
            )}
            <line
              x1={rear.x}
              y1={-rear.y}
              x2={p.front.x}
              y2={-p.front.y}
              stroke={p.colour}
              strokeWidth={stroke * 2.8}
              strokeLinecap="round"
              strokeOpacity={0.85}
            />
            <circle
              cx={p.front.x}
              cy={-p.front.y}
              r={stroke * 1.5}
              fill="#fff"
              stroke={p.colour}
              strokeWidth={stroke / 1.5}
            />
          </g>
        ))}
        <rect x={-stroke * 4} y={-stroke * 4} width={stroke * 8} height={stroke * 8} fill="#3b5370" />
        <circle cx={rear.x} cy={-rear.y} r={stroke * 2} fill="#b3261e" />
      </svg>
      <figcaption className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-sm font-semibold text-iron-800">
        {poses.map((p) => (
          <span key={p.key} className="inline-flex items-center gap-1.5">
            <span
              aria-hidden="true"
              className="inline-block h-1.5 w-5 rounded"
              style={{ background: p.colour }}
            />
            {p.label} ({Math.round(p.angle)}°)
          </span>
        ))}
        <span className="inline-flex items-center gap-1.5">
          <span aria-hidden="true" className="inline-block h-1.5 w-5 rounded bg-clear/60" />
          Reachable
        </span>
        <span className="inline-flex items-center gap-1.5">
          <span aria-hidden="true" className="inline-block size-2.5 rounded-full bg-withdraw" />
          Rear pivot
        </span>
      </figcaption>
    </figure>
  );
}
