import crypto from 'node:crypto';
import { parseArgs } from 'node:util';
import { StemwiseError } from '@stemwise/platform';
import { appendAuditEntries, insertAccessToken, listAccessTokens, listRegionNames, revokeAccessToken, type TokenRole } from '@stemwise/db';
import { newToken, TOKEN_ROLES } from '@stemwise/report';
import type { Runtime } from '../runtime';

export const summary = 'access tokens: token create --role admin|uploader|reader [--region R]… [--label L] | token list | token revoke ID';

const USAGE = `usage:
  stemwise token create --role admin|uploader|reader [--region R]… [--label L]
      prints a new token once (only its SHA-256 hash is stored); a reader needs at least one --region
  stemwise token list          tokens with their id, role, regions, label and state (never the token)
  stemwise token revoke ID     the token stops working (within a second on running servers)`;

export async function run(args: string[], rt: Runtime): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === 'create') return create(rest, rt);
  if (sub === 'list') return list(rest, rt);
  if (sub === 'revoke') return revoke(rest, rt);
  throw new StemwiseError('usage', `token needs create, list or revoke\n${USAGE}`);
}

async function create(args: string[], rt: Runtime): Promise<number> {
  let values: { role?: string; region?: string[]; label?: string };
  try {
    ({ values } = parseArgs({
      args,
      options: { role: { type: 'string' }, region: { type: 'string', multiple: true }, label: { type: 'string' } },
      allowPositionals: false,
    }));
  } catch (err) {
    throw new StemwiseError('usage', `${(err as Error).message}\n${USAGE}`);
  }
  const role = values.role as TokenRole | undefined;
  if (!role || !(TOKEN_ROLES as readonly string[]).includes(role)) throw new StemwiseError('usage', `--role must be one of ${TOKEN_ROLES.join(', ')}\n${USAGE}`);
  const regions = [...new Set((values.region ?? []).map((r) => r.trim()).filter(Boolean))];
  if (role === 'reader' && regions.length === 0) throw new StemwiseError('usage', 'a reader token needs at least one --region (the regions it may see)');
  if (role !== 'reader' && regions.length > 0) throw new StemwiseError('usage', `--region is for reader tokens only (an ${role} is not limited by region)`);
  const label = values.label?.trim() || null;

  const db = await rt.db();
  const known = new Set(await listRegionNames(db));
  for (const r of regions) {
    if (!known.has(r)) process.stderr.write(`stemwise: note: no region named '${r}' has been loaded yet; the token will see it once it is\n`);
  }
  const { token, hash } = newToken();
  const id = crypto.randomUUID();
  await db.transaction(async (tx) => {
    await insertAccessToken(tx, { id, tokenHash: hash, role, regions, label });
    await appendAuditEntries(tx, [{ actor: 'cli', action: 'token.create', target: id, details: { role, regions, label } }]);
  });
  process.stderr.write(`token ${id} (${role}${regions.length ? `: ${regions.join(', ')}` : ''}) created; it is shown only now:\n`);
  process.stdout.write(`${token}\n`);
  return 0;
}

async function list(args: string[], rt: Runtime): Promise<number> {
  if (args.length) throw new StemwiseError('usage', `token list takes no arguments\n${USAGE}`);
  const tokens = await listAccessTokens(await rt.db());
  process.stdout.write('id\trole\tregions\tlabel\tcreated\tstate\n');
  for (const t of tokens) {
    const state = t.revokedAt ? `revoked ${t.revokedAt.toISOString()}` : 'active';
    process.stdout.write(`${t.id}\t${t.role}\t${t.regions.join(',')}\t${t.label ?? ''}\t${t.createdAt.toISOString()}\t${state}\n`);
  }
  return 0;
}

async function revoke(args: string[], rt: Runtime): Promise<number> {
  const id = args[0];
  if (args.length !== 1 || !/^[0-9a-f-]{36}$/i.test(id)) throw new StemwiseError('usage', `token revoke takes one token id (see 'stemwise token list')\n${USAGE}`);
  const db = await rt.db();
  const done = await db.transaction(async (tx) => {
    const ok = await revokeAccessToken(tx, id);
    if (ok) await appendAuditEntries(tx, [{ actor: 'cli', action: 'token.revoke', target: id }]);
    return ok;
  });
  if (!done) throw new StemwiseError('not_found', `no active token has id ${id}`);
  process.stderr.write(`token ${id} revoked\n`);
  return 0;
}
