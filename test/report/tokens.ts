import crypto from 'node:crypto';
import { insertAccessToken, revokeAccessToken, type Queryable, type TokenRole } from '@stemwise/db';
import { newToken } from '@stemwise/report';

export interface TestToken {
  id: string;
  token: string;
  role: TokenRole;
}

export async function createToken(db: Queryable, role: TokenRole, regions: string[] = [], label = 'test'): Promise<TestToken> {
  const { token, hash } = newToken();
  const id = crypto.randomUUID();
  await insertAccessToken(db, { id, tokenHash: hash, role, regions, label });
  return { id, token, role };
}

export async function revokedToken(db: Queryable): Promise<TestToken> {
  const t = await createToken(db, 'admin', [], 'revoked');
  await revokeAccessToken(db, t.id);
  return t;
}
