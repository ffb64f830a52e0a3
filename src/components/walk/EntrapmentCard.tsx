/**
 * Sensing devices: the places along this gate where someone can be caught (per direction of
 * travel) and the protection fitted for each, as the entrapment-protection rules read them.
 */
import { memo, useId } from 'react';
import type { Json } from '@/lib/walk/merge-patch';
import { useWalkActions } from './context';
import { DEVICE_LABEL, DIRECTION_LABEL, ZONE_LABEL } from '@/lib/vocabulary';

interface Zone {
  zone: string;
  direction: 'closing' | 'opening';
}
interface Device {
  type: string;
  direction: 'closing' | 'opening';
  zone: string;
  monitored: boolean;
}
export interface EntrapmentValue {
  zones: Zone[];
  devices: Device[];
  edition?: 'pre-2016' | '2016';
}

const selectClass = 'field min-h-11';

function Select({
  label,
  value,
  options,
  onChange,
  disabled,
}: {
  label: string;
  value: string;
  options: Record<string, string>;
  onChange(v: string): void;
  disabled: boolean;
}) {
  const id = useId();
  return (
    <div>
      <label htmlFor={id} className="label">
        {label}
      </label>
      <select
        id={id}
        className={selectClass}
        value={value}
        disabled={disabled}
        onChange={(e) => onChange(e.target.value)}
      >
        {Object.entries(options).map(([key, text]) => (
          <option key={key} value={key}>
            {text}
          </option>
        ))}
      </select>
    </div>
  );
}

function EntrapmentCardView({ value, needed }: { value: Json | undefined; needed: boolean }) {
  const { sync, editable } = useWalkActions();
  const current = (value ?? { zones: [], devices: [] }) as unknown as EntrapmentValue;
  const save = (next: EntrapmentValue) =>
    void sync.edit({ observations: { entrapment: next as unknown as Json } });
  const setZone = (i: number, zone: Partial<Zone>) =>
    save({ ...current, zones: current.zones.map((z, j) => (j === i ? { ...z, ...zone } : z)) });
  const setDevice = (i: number, device: Partial<Device>) =>
    save({ ...current, devices: current.devices.map((d, j) => (j === i ? { ...d, ...device } : d)) });

  return (
    <section
      id="item-entrapment"
      tabIndex={-1}
      aria-labelledby="entrapment-title"
      className={`card scroll-mt-32 border-l-4 ${needed ? 'border-l-brass-500' : 'border-l-iron-200'}`}
    >
      <h3 id="entrapment-title" className="text-lg font-semibold text-iron-900">
        Entrapment zones and protection
      </h3>
      <p className="mt-1 text-sm text-iron-600">
        List every place a person could be caught as the gate moves, then each device that protects it. Two
        independent means per direction are expected on gates built to the current rules.
      </p>

      <h4 className="mt-4 font-semibold text-iron-900">Zones found ({current.zones.length})</h4>
      <ul className="mt-2 grid gap-3">
        {current.zones.map((zone, i) => (
          <li
            key={i}
            className="grid gap-2 rounded-lg border border-iron-100 p-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end"
          >
            <Select
              label="Where"
              value={zone.zone}
              options={ZONE_LABEL}
              disabled={!editable}
              onChange={(v) => setZone(i, { zone: v })}
            />
            <Select
              label="When"
              value={zone.direction}
              options={DIRECTION_LABEL}
              disabled={!editable}
              onChange={(v) => setZone(i, { direction: v as Zone['direction'] })}
            />
            {editable && (
              <button
                type="button"
                className="btn-secondary"
                onClick={() => save({ ...current, zones: current.zones.filter((_, j) => j !== i) })}
              >
                Remove zone
              </button>
            )}
          </li>
        ))}
      </ul>
      {editable && (
        <button
          type="button"
          className="btn-secondary mt-2"
          onClick={() =>
            save({ ...current, zones: [...current.zones, { zone: 'closing_edge', direction: 'closing' }] })
          }
        >
          + Add a zone
        </button>
      )}

      <h4 className="mt-5 font-semibold text-iron-900">Protection fitted ({current.devices.length})</h4>
      <ul className="mt-2 grid gap-3">
        {current.devices.map((device, i) => (
          <li key={i} className="grid gap-2 rounded-lg border border-iron-100 p-3 sm:grid-cols-2">
            <Select
              label="Type"
              value={device.type}
              options={DEVICE_LABEL}
              disabled={!editable}
              onChange={(v) => setDevice(i, { type: v })}
            />
            <Select
              label="Protects"
              value={device.zone}
              options={ZONE_LABEL}
              disabled={!editable}
              onChange={(v) => setDevice(i, { zone: v })}
            />
            <Select
              label="When"
              value={device.direction}
              options={DIRECTION_LABEL}
              disabled={!editable}
              onChange={(v) => setDevice(i, { direction: v as Device['direction'] })}
            />
            <label className="flex min-h-11 items-center gap-3 self-end font-semibold text-iron-900">
              <input
                type="checkbox"
                className="size-6 accent-iron-800"
                checked={device.monitored}
                disabled={!editable}
                onChange={(e) => setDevice(i, { monitored: e.target.checked })}
              />
              Monitored by the operator
            </label>
            {editable && (
              <button
                type="button"
                className="btn-secondary sm:col-span-2"
                onClick={() => save({ ...current, devices: current.devices.filter((_, j) => j !== i) })}
              >
                Remove device
              </button>
            )}
          </li>
        ))}
      </ul>
      {editable && (
        <button
          type="button"
          className="btn-secondary mt-2"
          onClick={() =>
            save({
              ...current,
              devices: [
                ...current.devices,
                {
                  type: 'B1',
                  zone: current.zones[0]?.zone ?? 'closing_edge',
                  direction: current.zones[0]?.direction ?? 'closing',
                  monitored: true,
                },
              ],
            })
          }
        >
          + Add a device
        </button>
      )}
    </section>
  );
}

export const EntrapmentCard = memo(EntrapmentCardView);
