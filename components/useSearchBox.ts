import { useEffect, useRef, useState } from 'react';

/**
 * A search box over a filter value kept in the address: what is typed goes out after `delayMs`
 * of calm (trimmed; empty clears the filter). The search as last sent is remembered: a different
 * one arriving in `value` (the address changed: Back, a link) replaces what is typed; our own
 * coming back does not (typing goes on meanwhile).
 */
export function useSearchBox<T extends { q?: string }>(value: T, onChange: (next: T) => void, delayMs: number): [string, (text: string) => void] {
  const [q, setQ] = useState(value.q ?? '');
  const latest = useRef({ value, onChange });
  latest.current = { value, onChange };
  const sent = useRef(value.q ?? '');
  useEffect(() => {
    if ((value.q ?? '') === sent.current) return;
    sent.current = value.q ?? '';
    setQ(value.q ?? '');
  }, [value.q]);
  useEffect(() => {
    if ((latest.current.value.q ?? '') === q.trim()) return;
    const t = setTimeout(() => {
      sent.current = q.trim();
      latest.current.onChange({ ...latest.current.value, q: q.trim() || undefined });
    }, delayMs);
    return () => clearTimeout(t);
  }, [q, delayMs]);
  return [q, setQ];
}
