import bcrypt from 'bcryptjs';

/** bcrypt cost: 10 by default; BCRYPT_ROUNDS may lower it for tests (never below 4). */
export function bcryptRounds(env: NodeJS.ProcessEnv = process.env): number {
  const n = Number(env.BCRYPT_ROUNDS ?? 10);
  return Number.isInteger(n) && n >= 4 && n <= 15 ? n : 10;
}

export const hashPassword = (plain: string) => bcrypt.hash(plain, bcryptRounds());
export const verifyPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);

/** A hash of nothing anyone knows, compared against when the e-mail is unknown so both failures take alike. */
let decoy: string | null = null;
export async function decoyHash(): Promise<string> {
  decoy ??= await bcrypt.hash(`decoy-${Math.random()}`, bcryptRounds());
  return decoy;
}
