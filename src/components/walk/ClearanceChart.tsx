/** The gap between ram body and leaf over the swing, against the clearance wanted: a small SVG chart. */
import type { UnitSystem } from '@/lib/units';
import { formatLength } from '@/lib/vocabulary';
import type { SwingGeometryChart } from '@/lib/rules/calculators/swing-geometry';

const W = 320;
const H = 150;
const M = { left: 44, right: 10, top: 10, bottom: 28 };

export function ClearanceChart({
  chart,
  limitMm,
  units,
}: {
  chart: SwingGeometryChart;
  limitMm: number;
  units: UnitSystem;
}) {
  const angles = chart.angleDeg;
  const values = chart.clearanceMm;
  const maxAngle = angles[angles.length - 1] ?? 90;
  const top = Math.max(...values, limitMm) * 1.15;
  const bottom = Math.min(0, ...values);
  const x = (a: number) => M.left + (a / (maxAngle || 1)) * (W - M.left - M.right);
  const y = (v: number) => M.top + ((top - v) / (top - bottom || 1)) * (H - M.top - M.bottom);
  const points = angles.map((a, i) => `${x(a).toFixed(1)},${y(values[i] as number).toFixed(1)}`).join(' ');
  const min = Math.min(...values);
  const minAt = angles[values.indexOf(min)] ?? 0;
  return (
    <figure className="m-0 mt-3">
      <figcaption className="mb-1 text-sm font-semibold text-iron-900">
        Ram-to-leaf clearance over the swing
      </figcaption>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="h-auto w-full"
        role="img"
        aria-label={`Clearance from ${formatLength(values[0] ?? 0, units)} closed to ${formatLength(values[values.length - 1] ?? 0, units)} at ${maxAngle}°, smallest ${formatLength(min, units)} at ${minAt}°; the dashed line is the ${formatLength(limitMm, units)} wanted.`}
      >
        <rect
          x={M.left}
          y={y(limitMm)}
          width={W - M.left - M.right}
          height={Math.max(0, y(bottom) - y(limitMm))}
          fill="#b3261e"
          fillOpacity={0.08}
        />
        <line
          x1={M.left}
          x2={W - M.right}
          y1={y(limitMm)}
          y2={y(limitMm)}
          stroke="#b3261e"
          strokeWidth={1.5}
          strokeDasharray="6 4"
        />
        <line x1={M.left} x2={M.left} y1={M.top} y2={H - M.bottom} stroke="#3b5370" />
        <line x1={M.left} x2={W - M.right} y1={H - M.bottom} y2={H - M.bottom} stroke="#3b5370" />
        <polyline points={points} fill="none" stroke="#1d2c3f" strokeWidth={2.5} strokeLinejoin="round" />
        <circle cx={x(minAt)} cy={y(min)} r={4} fill={min < limitMm ? '#b3261e' : '#1f7a45'} />
        <text x={M.left - 4} y={y(top / 1.15) + 4} textAnchor="end" fontSize="11" fill="#1d2c3f">
          {formatLength(top / 1.15, units)}
        </text>
        <text x={M.left - 4} y={y(limitMm) + 4} textAnchor="end" fontSize="11" fill="#b3261e">
          {formatLength(limitMm, units)}
        </text>
        <text x={M.left} y={H - 10} fontSize="11" fill="#1d2c3f">
          0°
        </text>
        <text x={W - M.right} y={H - 10} textAnchor="end" fontSize="11" fill="#1d2c3f">
          {maxAngle}°
        </text>
        <text x={(M.left + W - M.right) / 2} y={H - 10} textAnchor="middle" fontSize="11" fill="#3b5370">
          opening angle
        </text>
      </svg>
    </figure>
  );
}
