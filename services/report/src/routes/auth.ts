import type { FastifyInstance, FastifyReply, FastifyRequest, preValidationAsyncHookHandler } from 'fastify';
import type { ServiceDeps } from '@stemwise/core';
import { hashToken, type Principal, type TokenVerifier, type Verification } from '../access';
import type { AuditWriter } from '../audit';
import type { SummaryCache } from '../summary-cache';

declare module 'fastify' {
  interface FastifyRequest {
    principal: Principal | null;
  }
}

/** What every route is built from. */
export interface RouteContext {
  deps: ServiceDeps;
  verifier: TokenVerifier;
  audit: AuditWriter;
  cache: SummaryCache;
  /** Failed authentications per client address (429 once over the limit, before any token lookup). */
  authFailures: AuthFailureLimit;
}

export interface AuthFailureLimit {
  /** Seconds until the client may try again, or 0 when it is under its limit. */
  blockedFor(request: FastifyRequest): Promise<number>;
  /** Counts one failed authentication of the client. */
  count(request: FastifyRequest): Promise<void>;
}

/**
 * Cookie that carries the token for people using a browser: set when a page is opened once with
 * `?token=…`, HttpOnly (no script can read it), SameSite=Lax, Path=/, and Secure when the request came
 * over https (directly or through a trusted proxy). Lax, not Strict: a link to a page from a mail or a
 * wiki then opens signed in; this is safe because the cookie is accepted for GET and HEAD only and no
 * GET changes anything, so a page cannot be used to submit anything on a person's behalf.
 */
export const TOKEN_COOKIE = 'stemwise_token';

export function cookieValue(header: string | undefined, name: string): string | null {
  if (!header) return null;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) {
      try {
        return decodeURIComponent(part.slice(eq + 1).trim());
      } catch {
        return null;
      }
    }
  }
  return null;
}

function credential(request: FastifyRequest, allowCookie: boolean): string | null {
  const auth = request.headers.authorization;
  if (auth) {
    const m = /^Bearer\s+(\S+)\s*$/i.exec(auth);
    return m ? m[1] : '';
  }
  if (allowCookie && (request.method === 'GET' || request.method === 'HEAD')) return cookieValue(request.headers.cookie, TOKEN_COOKIE);
  return null;
}

export type Deny = (reply: FastifyReply, status: 401 | 403 | 404 | 429, code: string, message: string) => FastifyReply;

/** JSON errors for the API. */
export const denyJson: Deny = (reply, status, code, message) => {
  if (status === 401) reply.header('www-authenticate', 'Bearer realm="stemwise"');
  return reply.code(status).type('application/json; charset=utf-8').send(JSON.stringify({ error: code, message }));
};

/**
 * A preValidation hook that admits requests with a valid token (Authorization: Bearer, or the cookie
 * for GET/HEAD when `cookie`), sets `request.principal`, and answers 401 otherwise. It runs before the
 * parameters are validated: a request without a token learns nothing from the validation messages,
 * and a token holder's request with bad parameters (a 400) is audited like any other use.
 */
export function requireToken(ctx: RouteContext, options: { cookie: boolean; deny?: Deny }): preValidationAsyncHookHandler {
  const deny = options.deny ?? denyJson;
  return async (request, reply) => {
    const token = credential(request, options.cookie);
    if (token === null) return deny(reply, 401, 'unauthorized', 'a token is needed: send Authorization: Bearer <token>');
    const v = await checkToken(ctx, request, reply, token, deny);
    if (!v) return reply;
    if (!v.ok) return deny(reply, 401, 'unauthorized', v.reason === 'revoked' ? 'this token was revoked' : 'this token is not valid');
    request.principal = v.principal;
  };
}

/**
 * Verifies a presented token under the client's limit of failed attempts: null when the client is over
 * it (a 429 has been sent; the token is not even looked up). A refusal is counted against the client
 * and recorded in the audit log with the token's id when it is a revoked token, else with the first 12
 * hex digits of the SHA-256 of what was sent (never the credential itself).
 */
export async function checkToken(ctx: RouteContext, request: FastifyRequest, reply: FastifyReply, token: string, deny: Deny): Promise<Verification | null> {
  const wait = await ctx.authFailures.blockedFor(request);
  if (wait > 0) {
    reply.header('retry-after', String(wait));
    deny(reply, 429, 'too_many_requests', `too many failed sign-in attempts from this address; try again in ${wait} s`);
    return null;
  }
  const v = await ctx.verifier.verify(token);
  if (!v.ok) {
    await ctx.authFailures.count(request);
    ctx.audit.record({
      actor: v.tokenId ?? 'unknown',
      action: 'token.refused',
      target: routeOf(request),
      details: { reason: v.reason, client: request.ip, ...(v.tokenId ? {} : { sha256_prefix: hashToken(token).slice(0, 12) }) },
    });
  }
  return v;
}

/** The route pattern and method (never the query string: a page URL may carry a token). */
export function routeOf(request: FastifyRequest): string {
  return `${request.method} ${request.routeOptions.url ?? request.url.split('?')[0]}`;
}

/** Records every request made with a valid token in the audit log (actor = token id); refusals are recorded by `checkToken`. */
export function auditTokenUse(app: FastifyInstance, ctx: RouteContext): void {
  app.decorateRequest('principal', null);
  app.addHook('onResponse', async (request, reply) => {
    const p = request.principal;
    if (!p) return;
    const params = request.params as Record<string, unknown> | undefined;
    ctx.audit.record({
      actor: p.tokenId,
      action: 'token.use',
      target: routeOf(request),
      details: { status: reply.statusCode, ...(params && Object.keys(params).length ? { params } : {}) },
    });
  });
}
