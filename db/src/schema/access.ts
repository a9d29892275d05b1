import { bigserial, check, index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/** Access tokens, stored only as SHA-256 hashes; readers are limited to named regions. */
export const accessTokens = pgTable(
  'access_tokens',
  {
    id: uuid('id').primaryKey(),
    tokenHash: text('token_hash').notNull().unique(),
    role: text('role').notNull(),
    regions: text('regions').array().notNull().default(sql`'{}'::text[]`),
    label: text('label'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
  },
  (t) => [check('access_tokens_role_chk', sql`${t.role} in ('admin','uploader','reader')`)],
);

/** Who did what: batch submissions, replacements, token creation and every token use. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
    actor: text('actor').notNull(),
    action: text('action').notNull(),
    target: text('target'),
    details: jsonb('details').notNull().default({}),
  },
  (t) => [index('audit_log_at_idx').on(t.at)],
);
