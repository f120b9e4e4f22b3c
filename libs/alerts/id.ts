// Short, deterministic alert ids: FNV-1a 32-bit (Fowler, Noll & Vo; common practice) over the episode key and its
// raise time, as 8 hex digits. Deterministic so a replay gives the same ids; short so a person can type one.

export function alertId(key: string, raisedAtMs: number): string {
  const s = `${key}@${raisedAtMs}`;
  let h = 0x811c9dc5; // FNV offset basis
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0; // FNV prime
  }
  return h.toString(16).padStart(8, '0');
}
