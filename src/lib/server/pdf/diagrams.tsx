/**
 * Drawings made from stored measurements with react-pdf's Svg: the swing operator's geometry
 * seen from above (leaf and ram at closed, half and full opening) and force-trace plots with
 * their limit line. Each returns null when the assessment has nothing to draw.
 */
import { Circle, G, Line, Path, Polyline, Rect, Svg, Text as SvgText, View, Text } from '@react-pdf/renderer';
import type { ReportForceTrace, SwingGeometryMeasurements } from './report-model';
import { colours } from './theme';
import { styles } from './styles';

const DIAGRAM_W = 250;
const DIAGRAM_H = 190;

interface PointMm {
  x: number;
  y: number;
}

/** Hinge axis at the origin, closed leaf along +x, opening towards +y; rear pivot at (−A, B). */
function leafPoint(distanceMm: number, angleDeg: number): PointMm {
  const a = (angleDeg * Math.PI) / 180;
  return { x: distanceMm * Math.cos(a), y: distanceMm * Math.sin(a) };
}

export function SwingGeometryDiagram({
  geometry,
  formatLength,
}: {
  geometry: SwingGeometryMeasurements | null;
  formatLength: (mm: number) => string;
}) {
  if (!geometry) return null;
  const { aMm, bMm, bracketFromHingeMm, retractedLengthMm, strokeMm, targetOpeningDeg } = geometry;
  const leafMm = Math.max(geometry.leafWidthMm ?? bracketFromHingeMm * 1.6, bracketFromHingeMm * 1.1);
  const angles = [0, targetOpeningDeg / 2, targetOpeningDeg];
  const rear: PointMm = { x: -aMm, y: bMm };
  const points = [rear, { x: 0, y: 0 }, ...angles.map((deg) => leafPoint(leafMm, deg))];
  const xs = points.map((p) => p.x);
  const ys = points.map((p) => p.y);
  const pad = 14;
  const spanX = Math.max(...xs) - Math.min(...xs) || 1;
  const spanY = Math.max(...ys) - Math.min(...ys) || 1;
  const scale = Math.min((DIAGRAM_W - 2 * pad) / spanX, (DIAGRAM_H - 2 * pad) / spanY);
  // SVG y grows downwards: flip so the leaf opens "up" the page.
  const toSvg = (p: PointMm) => ({
    x: pad + (p.x - Math.min(...xs)) * scale,
    y: DIAGRAM_H - pad - (p.y - Math.min(...ys)) * scale,
  });
  const hinge = toSvg({ x: 0, y: 0 });
  const rearSvg = toSvg(rear);
  const shades = [colours.iron800, colours.iron400, colours.brass500];
  const lengths = angles.map((deg) => {
    const front = leafPoint(bracketFromHingeMm, deg);
    return Math.hypot(front.x - rear.x, front.y - rear.y);
  });
  const reachable = lengths.map(
    (len) => len >= retractedLengthMm - 0.5 && len <= retractedLengthMm + strokeMm + 0.5,
  );
  return (
    <View wrap={false} style={{ flexDirection: 'row', marginTop: 6 }}>
      <Svg width={DIAGRAM_W} height={DIAGRAM_H} viewBox={`0 0 ${DIAGRAM_W} ${DIAGRAM_H}`}>
        <Rect x={0} y={0} width={DIAGRAM_W} height={DIAGRAM_H} fill={colours.iron50} />
        {angles.map((deg, i) => {
          const end = toSvg(leafPoint(leafMm, deg));
          const front = toSvg(leafPoint(bracketFromHingeMm, deg));
          return (
            <G key={deg}>
              <Line
                x1={hinge.x}
                y1={hinge.y}
                x2={end.x}
                y2={end.y}
                stroke={shades[i]}
                strokeWidth={i === 0 ? 4 : 2.5}
              />
              <Line
                x1={rearSvg.x}
                y1={rearSvg.y}
                x2={front.x}
                y2={front.y}
                stroke={reachable[i] ? shades[i] : colours.withdraw}
                strokeWidth={1.5}
                strokeDasharray="4,2"
              />
              <Circle cx={front.x} cy={front.y} r={2.2} fill={shades[i]} />
            </G>
          );
        })}
        <Circle cx={hinge.x} cy={hinge.y} r={3.5} fill={colours.iron900} />
        <Rect x={rearSvg.x - 3} y={rearSvg.y - 3} width={6} height={6} fill={colours.brass700} />
        <Path
          d={`M ${hinge.x - 10} ${hinge.y + 6} L ${hinge.x + 10} ${hinge.y + 6}`}
          stroke={colours.iron600}
          strokeWidth={1}
        />
      </Svg>
      <View style={{ flex: 1, paddingLeft: 12 }}>
        <Text style={styles.h3}>Operator geometry (top view)</Text>
        <Text style={styles.small}>
          Hinge axis (dot), operator rear pivot (square), leaf at closed (dark), half open (light) and{' '}
          {Math.round(targetOpeningDeg)}° open (brass). Dashed: the ram; red where it cannot reach.
        </Text>
        <Text style={[styles.small, { marginTop: 4 }]}>
          A {formatLength(aMm)} · B {formatLength(bMm)} · bracket {formatLength(bracketFromHingeMm)} from the
          hinge
        </Text>
        <Text style={styles.small}>
          Ram {formatLength(retractedLengthMm)} retracted, stroke {formatLength(strokeMm)}
        </Text>
        {angles.map((deg, i) => (
          <Text key={deg} style={styles.small}>
            At {Math.round(deg)}°: pivot to pivot {formatLength(lengths[i])},{' '}
            {reachable[i] ? 'within the stroke' : 'outside the stroke'}
          </Text>
        ))}
      </View>
    </View>
  );
}

const PLOT_W = 460;
const PLOT_H = 150;

export function ForceTracePlot({
  trace,
  formatForce,
}: {
  trace: ReportForceTrace;
  formatForce: (n: number) => string;
}) {
  if (trace.samples.length < 2) return null;
  const margin = { left: 38, right: 8, top: 10, bottom: 22 };
  const ts = trace.samples.map(([t]) => t);
  const fs = trace.samples.map(([, f]) => f);
  const tMin = Math.min(...ts);
  const tMax = Math.max(...ts);
  const fMax = Math.max(...fs, trace.limitN ?? 0) * 1.1 || 1;
  const x = (t: number) =>
    margin.left + ((t - tMin) / (tMax - tMin || 1)) * (PLOT_W - margin.left - margin.right);
  const y = (f: number) =>
    PLOT_H - margin.bottom - (Math.max(0, f) / fMax) * (PLOT_H - margin.top - margin.bottom);
  const step = Math.max(1, Math.ceil(trace.samples.length / 600));
  const line = trace.samples
    .filter((_, i) => i % step === 0)
    .map(([t, f]) => `${x(t).toFixed(1)},${y(f).toFixed(1)}`)
    .join(' ');
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((k) => k * fMax);
  return (
    <View wrap={false} style={{ marginTop: 6, marginBottom: 8 }}>
      <Text style={styles.h3}>
        Force trace: {trace.label}
        {trace.passed === null ? '' : trace.passed ? ' (within limits)' : ' (over the limit)'}
      </Text>
      <Svg width={PLOT_W} height={PLOT_H} viewBox={`0 0 ${PLOT_W} ${PLOT_H}`}>
        <Rect
          x={margin.left}
          y={margin.top}
          width={PLOT_W - margin.left - margin.right}
          height={PLOT_H - margin.top - margin.bottom}
          fill={colours.iron50}
        />
        {ticks.map((f) => (
          <G key={f}>
            <Line
              x1={margin.left}
              y1={y(f)}
              x2={PLOT_W - margin.right}
              y2={y(f)}
              stroke={colours.iron100}
              strokeWidth={0.5}
            />
            <SvgText x={2} y={y(f) + 2} style={{ fontSize: 6 }} fill={colours.iron600}>
              {formatForce(f)}
            </SvgText>
          </G>
        ))}
        {trace.limitN !== null ? (
          <Line
            x1={margin.left}
            y1={y(trace.limitN)}
            x2={PLOT_W - margin.right}
            y2={y(trace.limitN)}
            stroke={colours.withdraw}
            strokeWidth={1}
            strokeDasharray="5,3"
          />
        ) : null}
        <Polyline points={line} stroke={colours.iron800} strokeWidth={1.2} fill="none" />
        <SvgText x={margin.left} y={PLOT_H - 6} style={{ fontSize: 6 }} fill={colours.iron600}>
          {`${tMin.toFixed(2)} s`}
        </SvgText>
        <SvgText x={PLOT_W - margin.right - 24} y={PLOT_H - 6} style={{ fontSize: 6 }} fill={colours.iron600}>
          {`${tMax.toFixed(2)} s`}
        </SvgText>
      </Svg>
      <Text style={styles.small}>
        {trace.peakN !== null ? `Peak ${formatForce(trace.peakN)}. ` : ''}
        {trace.limitN !== null ? `Limit ${formatForce(trace.limitN)} (dashed red line).` : ''}
      </Text>
    </View>
  );
}
