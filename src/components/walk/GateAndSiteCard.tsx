/**
 * First thing on the walk: who is around this gate (the site context the rules and hazard
 * ratings depend on) and the gate facts from the office record, with a way to correct them.
 */
import type { WalkGate } from '@/lib/api/walk-through';
import { memo } from 'react';
import type { Json } from '@/lib/walk/merge-patch';
import type { UnitSystem } from '@/lib/units';
import { formatLength, formatMass, usageClassLabel } from '@/lib/vocabulary';
import { ChoiceButtons } from './ChoiceButtons';
import { useWalkActions } from './context';

const SITE_QUESTIONS = [
  { key: 'pedestriansUseDriveway', prompt: 'Do people walk through the gateway?' },
  { key: 'childrenOrPetsPresent', prompt: 'Are children or pets about?' },
  { key: 'publicAccess', prompt: 'Can the public reach the gate?' },
  { key: 'slopeAcrossSwing', prompt: 'Does the ground slope across the gate’s travel?' },
] as const;

const yesNo = [
  { value: 'yes', label: 'Yes' },
  { value: 'no', label: 'No' },
];

const KIND_LABEL: Record<string, string> = {
  swing: 'Swing',
  slide: 'Slide',
  barrier_arm: 'Barrier arm',
  vertical_lift: 'Vertical lift',
  vertical_pivot: 'Vertical pivot',
  overhead_pivot: 'Overhead pivot',
};

function yesNoUnknown(value: boolean | null | undefined): string {
  return value === true ? 'Yes' : value === false ? 'No' : 'Not recorded';
}

interface Props {
  site: Record<string, Json> | undefined;
  gate: WalkGate;
  gateEditUrl: string;
  units: UnitSystem;
  neededSite: boolean;
  neededGate: boolean;
}

function GateAndSiteCardView({ site, gate, gateEditUrl, units, neededSite, neededGate }: Props) {
  const { sync, editable } = useWalkActions();
  const facts: [string, string][] = [
    [
      'Kind',
      `${KIND_LABEL[gate.kind] ?? gate.kind}, ${gate.leaves === 'double' ? 'two leaves' : 'one leaf'}`,
    ],
    ...(gate.kind === 'swing'
      ? [
          [
            'Opens',
            gate.openingDirection === 'pull_to_open'
              ? 'Toward the operator side'
              : gate.openingDirection === 'push_to_open'
                ? 'Away from the operator side'
                : 'Not recorded',
          ] as [string, string],
        ]
      : []),
    [
      'Width',
      gate.entered.width
        ? `${gate.entered.width.value} ${gate.entered.width.unit}`
        : gate.widthMm
          ? formatLength(gate.widthMm, units)
          : 'Not recorded',
    ],
    [
      'Weight',
      gate.entered.weight
        ? `${gate.entered.weight.value} ${gate.entered.weight.unit}`
        : gate.weightKg
          ? formatMass(gate.weightKg, units)
          : 'Not recorded',
    ],
    ['Usage class', usageClassLabel(gate.usageClass)],
    ['Operator listed', yesNoUnknown(gate.operator.listed)],
    ['Automatic closing', yesNoUnknown(gate.operator.automaticClosing)],
  ];
  return (
    <section
      aria-labelledby="gate-site-title"
      id="item-site"
      tabIndex={-1}
      className={`card scroll-mt-32 border-l-4 ${neededSite || neededGate ? 'border-l-brass-500' : 'border-l-iron-200'}`}
    >
      <h2 id="gate-site-title" className="text-xl font-bold text-iron-900">
        Gate and site
      </h2>
      <div className="mt-3 grid gap-4 md:grid-cols-2">
        <div className="grid gap-4">
          {SITE_QUESTIONS.map((q) => {
            const value = site?.[q.key];
            return (
              <div key={q.key}>
                <p id={`site-${q.key}`} className="mb-2 font-semibold text-iron-900">
                  {q.prompt}
                </p>
                <ChoiceButtons
                  name={`site-${q.key}`}
                  labelledBy={`site-${q.key}`}
                  columns={2}
                  options={yesNo}
                  disabled={!editable}
                  value={value === true ? 'yes' : value === false ? 'no' : undefined}
                  onChange={(v) => void sync.edit({ observations: { site: { [q.key]: v === 'yes' } } })}
                />
              </div>
            );
          })}
        </div>
        <div id="item-gate" tabIndex={-1} className="rounded-lg bg-iron-50 p-3">
          <h3 className="font-semibold text-iron-900">{gate.label}</h3>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
            {facts.map(([term, value]) => (
              <div key={term} className="contents">
                <dt className="text-iron-600">{term}</dt>
                <dd className={`font-semibold ${value === 'Not recorded' ? 'text-remedy' : 'text-iron-900'}`}>
                  {value}
                </dd>
              </div>
            ))}
          </dl>
          <a className="btn-secondary mt-3 w-full" href={gateEditUrl}>
            Correct the gate details
          </a>
        </div>
      </div>
    </section>
  );
}

export const GateAndSiteCard = memo(GateAndSiteCardView);
