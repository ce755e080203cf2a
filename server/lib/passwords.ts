/** Password hashing with bcryptjs. The cost comes from BCRYPT_COST (12 unless configured lower for tests). */
import bcrypt from 'bcryptjs';
import { env } from '../env';

export const hashPassword = (password: string) => bcrypt.hash(password, env().BCRYPT_COST);
export const verifyPassword = (password: string, hash: string) => bcrypt.compare(password, hash);

/** A hash to compare against when the account does not exist, so sign-in takes the same time either way. */
let dummyHash: Promise<string> | undefined;
export const dummyPasswordHash = () => (dummyHash ??= hashPassword('not-a-real-password'));
