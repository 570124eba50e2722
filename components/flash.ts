// One-shot messages that outlive a navigation ("Site Moorgate saved." shown on the list the form
// returns to). A tiny external store read with useSyncExternalStore; no library needed.
import { useSyncExternalStore } from 'react';

type Listener = () => void;
export interface Flash {
  id: number;
  text: string;
  /** Where it belongs (e.g. 'network/sites'); screens show only their own. */
  scope: string;
}

let current: Flash | null = null;
let seq = 0;
const listeners = new Set<Listener>();

export function flash(scope: string, text: string): void {
  seq += 1;
  current = { id: seq, text, scope };
  listeners.forEach((l) => l());
}

export function clearFlash(): void {
  if (!current) return;
  current = null;
  listeners.forEach((l) => l());
}

function subscribe(l: Listener): () => void {
  listeners.add(l);
  return () => listeners.delete(l);
}

export function useFlash(scope: string): Flash | null {
  const f = useSyncExternalStore(subscribe, () => current, () => null);
  return f && f.scope === scope ? f : null;
}
