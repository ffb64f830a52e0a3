/**
 * A force–time trace plotted with uPlot, with the limits it is judged against drawn across it
 * (peak, static, residual) and the 5-second mark after first contact. The canvas is described
 * in words for screen readers; the evaluation beside it carries the same figures as text.
 */
import { useEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { ForceTraceResult } from '@/lib/rules/calculators/force-trace';

interface Props {
  samples: readonly (readonly [number, number])[];
  evaluation: ForceTraceResult;
  label: string;
}

const LIMIT_COLOURS = { peak: '#b3261e', static: '#9a5b00', residual: '#3b5370' } as const;

export function TraceChart({ samples, evaluation, label }: Props) {
  const box = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const element = box.current;
    if (!element) return;
    const times = samples.map((s) => s[0]);
    const forces = samples.map((s) => s[1]);
    const limits = evaluation.limits;
    const markAt = evaluation.firstContactAt + 5;
    const drawLimits = (u: uPlot) => {
      const { ctx, bbox } = u;
      ctx.save();
      ctx.lineWidth = 2 * uPlot.pxRatio;
      ctx.setLineDash([8 * uPlot.pxRatio, 6 * uPlot.pxRatio]);
      const line = (value: number, colour: string) => {
        const y = u.valToPos(value, 'y', true);
        if (y < bbox.top || y > bbox.top + bbox.height) return;
        ctx.strokeStyle = colour;
        ctx.beginPath();
        ctx.moveTo(bbox.left, y);
        ctx.lineTo(bbox.left + bbox.width, y);
        ctx.stroke();
      };
      line(limits.peakN, LIMIT_COLOURS.peak);
      line(limits.maxStaticN, LIMIT_COLOURS.static);
      line(limits.maxResidualN, LIMIT_COLOURS.residual);
      const x = u.valToPos(markAt, 'x', true);
      ctx.strokeStyle = LIMIT_COLOURS.residual;
      ctx.setLineDash([3 * uPlot.pxRatio, 4 * uPlot.pxRatio]);
      ctx.beginPath();
      ctx.moveTo(x, bbox.top);
      ctx.lineTo(x, bbox.top + bbox.height);
      ctx.stroke();
      ctx.restore();
    };
    const width = Math.max(260, element.clientWidth);
    const plot = new uPlot(
      {
        width,
        height: 220,
        legend: { show: false },
        cursor: { show: false },
        scales: {
          x: { time: false },
          y: { range: (_u, _min, max) => [0, Math.max(max, limits.peakN) * 1.1] },
        },
        axes: [
          {
            label: 'seconds',
            stroke: '#1d2c3f',
            grid: { stroke: '#e1e7ee' },
            font: '12px Noto Sans, sans-serif',
            labelFont: '12px Noto Sans, sans-serif',
          },
          {
            label: 'newtons',
            stroke: '#1d2c3f',
            grid: { stroke: '#e1e7ee' },
            font: '12px Noto Sans, sans-serif',
            labelFont: '12px Noto Sans, sans-serif',
            size: 56,
          },
        ],
        series: [{}, { label: 'Force', stroke: '#1d2c3f', width: 2 }],
        hooks: { draw: [drawLimits] },
      },
      [times, forces],
      element,
    );
    const resize = new ResizeObserver(() =>
      plot.setSize({ width: Math.max(260, element.clientWidth), height: 220 }),
    );
    resize.observe(element);
    return () => {
      resize.disconnect();
      plot.destroy();
    };
  }, [samples, evaluation]);

  return (
    <figure className="m-0">
      <div
        ref={box}
        role="img"
        aria-label={`${label}: force over time, peaking at ${evaluation.peak} N against a ${evaluation.limits.peakN} N limit`}
        className="w-full overflow-hidden"
      />
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs font-semibold text-iron-700">
        <span>
          <span aria-hidden="true" style={{ color: LIMIT_COLOURS.peak }}>
            – –{' '}
          </span>
          peak limit {evaluation.limits.peakN} N
        </span>
        <span>
          <span aria-hidden="true" style={{ color: LIMIT_COLOURS.static }}>
            – –{' '}
          </span>
          static limit {evaluation.limits.maxStaticN} N
        </span>
        <span>
          <span aria-hidden="true" style={{ color: LIMIT_COLOURS.residual }}>
            – –{' '}
          </span>
          residual limit {evaluation.limits.maxResidualN} N, 5 s after contact (dotted)
        </span>
      </figcaption>
    </figure>
  );
}
