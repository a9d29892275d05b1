import crypto from 'node:crypto';
import { StemwiseError } from '@stemwise/platform';
import { appendAuditEntries, insertAccessToken, listAccessTokens, listRegionNames, revokeAccessToken, type TokenRole } from '@stemwise/db';
import { newToken, TOKEN_ROLES } from '@stemwise/report';
import { defineCommand, usageError, type CommandGroup } from '../command';
import { field, printErr, printOut } from '../output';

const create = defineCommand({
  summary: 'prints a new token once (only its SHA-256 hash is stored); a reader needs at least one --region',
  usage: `usage: stemwise token create --role admin|uploader|reader [--region R]… [--label L]

Prints a new token once on stdout (only its SHA-256 hash is stored). A reader token sees only the
regions given with --region (at least one); admin and uploader tokens are not limited by region.
`,
  options: { role: { type: 'string' }, region: { type: 'string', multiple: true }, label: { type: 'string' } },
  async run({ values }, rt) {
    const role = values.role as TokenRole | undefined;
    if (!role || !(TOKEN_ROLES as readonly string[]).includes(role)) throw new StemwiseError('usage', `--role must be one of ${TOKEN_ROLES.join(', ')}`);
    const regions = [...new Set((values.region ?? []).map((r) => r.trim()).filter(Boolean))];
    if (role === 'reader' && regions.length === 0) throw new StemwiseError('usage', 'a reader token needs at least one --region (the regions it may see)');
    if (role !== 'reader' && regions.length > 0) throw new StemwiseError('usage', `--region is for reader tokens only (an ${role} is not limited by region)`);
    const label = values.label?.trim() || null;

    const db = await rt.db();
    const known = new Set(await listRegionNames(db));
    for (const r of regions) {
      if (!known.has(r)) printErr(`stemwise: note: no region named '${field(r)}' has been loaded yet; the token will see it once it is\n`);
    }
    const { token, hash } = newToken();
    const id = crypto.randomUUID();
    await db.transaction(async (tx) => {
      await insertAccessToken(tx, { id, tokenHash: hash, role, regions, label });
      await appendAuditEntries(tx, [{ actor: 'cli', action: 'token.create', target: id, details: { role, regions, label } }]);
    });
    printErr(`token ${id} (${role}${regions.length ? `: ${regions.map(field).join(', ')}` : ''}) created; it is shown only now:\n`);
    printOut(`${token}\n`);
    return 0;
  },
});

const list = defineCommand({
  summary: 'tokens with their id, role, regions, label and state (never the token)',
  usage: `usage: stemwise token list

Tab-separated: id, role, regions, label, created, state (never the token itself).
`,
  options: {},
  async run(_args, rt) {
    const tokens = await listAccessTokens(await rt.db());
    printOut('id\trole\tregions\tlabel\tcreated\tstate\n');
    for (const t of tokens) {
      const state = t.revokedAt ? `revoked ${t.revokedAt.toISOString()}` : 'active';
      printOut(`${t.id}\t${t.role}\t${t.regions.map(field).join(',')}\t${field(t.label ?? '')}\t${t.createdAt.toISOString()}\t${state}\n`);
    }
    return 0;
  },
});

const revoke = defineCommand({
  summary: 'the token stops working (within a second on running servers)',
  usage: `usage: stemwise token revoke ID

ID is the token's id from 'stemwise token list'. The token stops working within a second on running servers.
`,
  options: {},
  positionals: true,
  async run({ positionals }, rt) {
    const id = positionals[0];
    if (positionals.length !== 1 || !/^[0-9a-f-]{36}$/i.test(id)) throw usageError('token revoke', "takes one token id, as 'stemwise token list' shows it");
    const db = await rt.db();
    const done = await db.transaction(async (tx) => {
      const ok = await revokeAccessToken(tx, id);
      if (ok) await appendAuditEntries(tx, [{ actor: 'cli', action: 'token.revoke', target: id }]);
      return ok;
    });
    if (!done) throw new StemwiseError('not_found', `no active token has id ${id}`);
    printErr(`token ${id} revoked\n`);
    return 0;
  },
});

const subcommands = { create, list, revoke };

export const command: CommandGroup = {
  usage: `usage:
  stemwise token create --role admin|uploader|reader [--region R]… [--label L]
  stemwise token list
  stemwise token revoke ID

${Object.entries(subcommands)
  .map(([name, c]) => `  ${name.padEnd(8)} ${c.summary}`)
  .join('\n')}
`,
  subcommands,
};
