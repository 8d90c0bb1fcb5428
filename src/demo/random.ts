/** A small seeded generator (mulberry32) so the invented history is the same on every device and in every test. */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4_294_967_296;
  };
}

/** A version-4-shaped UUID from the generator (deterministic ids for the demo records). */
export function seededUuid(random: () => number): string {
  const hex = Array.from({ length: 32 }, () => Math.floor(random() * 16).toString(16));
  hex[12] = '4';
  hex[16] = ((Number.parseInt(hex[16] as string, 16) & 0x3) | 0x8).toString(16);
  const s = hex.join('');
  return `${s.slice(0, 8)}-${s.slice(8, 12)}-${s.slice(12, 16)}-${s.slice(16, 20)}-${s.slice(20)}`;
}

/** Roughly normal noise (sum of uniforms), standard deviation `sd`. */
export function noise(random: () => number, sd: number): number {
  let sum = 0;
  for (let index = 0; index < 6; index += 1) sum += random();
  return (sum - 3) * sd * Math.SQRT2;
}
