import { randomInt } from 'node:crypto';

/** Invented words for join codes (WORD-1234): short, distinct, easy to read aloud. */
export const joinCodeWords = [
  'ORBIT', 'LATTICE', 'EMBER', 'QUARTZ', 'FJORD', 'TIDAL', 'CINDER', 'MAPLE', 'PRISM', 'DELTA',
  'NOVA', 'BASALT', 'COMET', 'HARBOR', 'LUMEN', 'MOSAIC', 'PEBBLE', 'RAVEN', 'SPRUCE', 'TUNDRA',
  'VELVET', 'WILLOW', 'ZENITH', 'ANCHOR', 'BRAMBLE', 'CASCADE', 'DUNE', 'FALCON', 'GLACIER', 'HELIX',
  'IVORY', 'JUNIPER', 'KESTREL', 'MERIDIAN', 'NECTAR', 'OPAL', 'PYLON', 'RIPPLE', 'SUMMIT', 'VORTEX',
] as const;

export function randomJoinCode(): string {
  const word = joinCodeWords[randomInt(joinCodeWords.length)];
  return `${word}-${String(randomInt(1000, 10000))}`;
}

/** Join codes are compared without regard to case or surrounding space. */
export const normaliseJoinCode = (code: string) => code.trim().toUpperCase();
