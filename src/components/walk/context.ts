/** What every item of the walk-through needs to record an edit, passed once through context. */
import { createContext, useContext } from 'react';
import type { UnitSystem } from '@/lib/units';
import type { WalkSync } from '@/lib/walk/sync';

export interface WalkActions {
  sync: WalkSync;
  assessmentId: string;
  units: UnitSystem;
  editable: boolean;
}

export const WalkActionsContext = createContext<WalkActions | null>(null);

export function useWalkActions(): WalkActions {
  const actions = useContext(WalkActionsContext);
  if (!actions) throw new Error('useWalkActions outside the walk-through');
  return actions;
}
