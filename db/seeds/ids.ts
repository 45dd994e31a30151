import { createHash } from 'node:crypto';

/** A stable uuid for a seeded record, so seeds can refer to each other and stay deterministic. */
export function seedId(kind: string, key: string | number): string {
  const h = createHash('sha1').update(`cellarwright:${kind}:${key}`).digest('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-5${h.slice(13, 16)}-a${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

/** A small deterministic pseudo-random generator (mulberry32) for demo data. */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
