/**
 * Seeded pseudo-random numbers for the demo scenarios: splitmix32 seeding a
 * xoshiro128** generator (Blackman & Vigna), normal variates by Box–Muller.
 * Fact of the trade: common practice, no source.
 */

function splitmix32(state: { s: number }): number {
  state.s = (state.s + 0x9e3779b9) | 0;
  let z = state.s;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

export interface Rng {
  /** Uniform in [0, 1). */
  uniform(): number;
  /** Standard normal. */
  normal(): number;
  /** Uniform in [a, b). */
  between(a: number, b: number): number;
}

/** A xoshiro128** stream seeded from a 32-bit integer seed (any finite number is reduced to 32 bits). */
export function createRng(seed: number): Rng {
  const st = { s: (Math.trunc(seed) ^ 0x5eed1234) | 0 };
  const s = new Uint32Array([splitmix32(st), splitmix32(st), splitmix32(st), splitmix32(st)]);
  if (s[0] === 0 && s[1] === 0 && s[2] === 0 && s[3] === 0) s[0] = 1;
  const rotl = (x: number, k: number) => ((x << k) | (x >>> (32 - k))) >>> 0;
  const next = (): number => {
    const result = Math.imul(rotl(Math.imul(s[1], 5) >>> 0, 7), 9) >>> 0;
    const t = (s[1] << 9) >>> 0;
    s[2] ^= s[0];
    s[3] ^= s[1];
    s[1] ^= s[2];
    s[0] ^= s[3];
    s[2] ^= t;
    s[3] = rotl(s[3], 11);
    return result;
  };
  let spare: number | undefined;
  const uniform = () => (next() * 2 ** -32 + (next() >>> 11) * 2 ** -53) % 1;
  return {
    uniform,
    between: (a, b) => a + (b - a) * uniform(),
    normal() {
      if (spare !== undefined) {
        const v = spare;
        spare = undefined;
        return v;
      }
      let u = 0;
      while (u === 0) u = uniform();
      const v = uniform();
      const rad = Math.sqrt(-2 * Math.log(u));
      spare = rad * Math.sin(2 * Math.PI * v);
      return rad * Math.cos(2 * Math.PI * v);
    },
  };
}
