import bcrypt from 'bcryptjs'

const ROUNDS = Number(process.env.BCRYPT_ROUNDS || 11)
let dummyHash: string | undefined

/** bcrypt hash of a password. */
export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, ROUNDS)
}

/** Constant-time comparison of a password with a stored hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash)
}

/** Compares against a throwaway hash, so an unknown e-mail takes as long as a wrong password. */
export async function burnPasswordCheck(password: string): Promise<false> {
  dummyHash ??= bcrypt.hashSync('greybody-timing-equaliser', ROUNDS)
  await bcrypt.compare(password, dummyHash)
  return false
}
