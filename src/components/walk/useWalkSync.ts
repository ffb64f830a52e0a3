/**
 * The React side of the sync loop: one WalkSync per page, its state through
 * useSyncExternalStore, and every request it makes run as a react-query mutation (so the
 * saving state and retries live where the rest of the app's server state does).
 */
import { useMutation } from '@tanstack/react-query';
import { useEffect, useState, useSyncExternalStore } from 'react';
import { sendDirect, WalkSync, type InitialAssessment, type SyncState } from '@/lib/walk/sync';

export function useWalkSync(initial: InitialAssessment): { sync: WalkSync; state: SyncState } {
  const [sync] = useState(() => new WalkSync(initial));
  const send = useMutation({
    mutationKey: ['walk-send', initial.id],
    mutationFn: sendDirect,
    networkMode: 'always',
    retry: false,
  });
  sync.sender = send.mutateAsync;
  useEffect(() => {
    void sync.start();
    return () => sync.stop();
  }, [sync]);
  const state = useSyncExternalStore(sync.subscribe, sync.getState, sync.getState);
  return { sync, state };
}
