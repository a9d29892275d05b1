import type { FastifyInstance, FastifyReply, FastifyRequest, preHandlerAsyncHookHandler } from 'fastify';
import type { ServiceDeps } from '@stemwise/core';
import type { Principal, TokenVerifier } from '../access';
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
}

/**
 * Cookie that carries the token for people using a browser: set when a page is opened once with
 * `?token=…`, HttpOnly (no script can read it), SameSite=Strict, Path=/. It is accepted for GET and
 * HEAD only, so a page cannot be used to submit anything on a person's behalf.
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

export type Deny = (reply: FastifyReply, status: 401 | 403 | 404, code: string, message: string) => FastifyReply;

/** JSON errors for the API. */
export const denyJson: Deny = (reply, status, code, message) => {
  if (status === 401) reply.header('www-authenticate', 'Bearer realm="stemwise"');
  return reply.code(status).type('application/json; charset=utf-8').send(JSON.stringify({ error: code, message }));
};

/**
 * A preHandler that admits requests with a valid token (Authorization: Bearer, or the cookie for
 * GET/HEAD when `cookie`), sets `request.principal`, and answers 401 otherwise.
 */
export function requireToken(ctx: RouteContext, options: { cookie: boolean; deny?: Deny }): preHandlerAsyncHookHandler {
  const deny = options.deny ?? denyJson;
  return async (request, reply) => {
    const token = credential(request, options.cookie);
    if (token === null) return deny(reply, 401, 'unauthorized', 'a token is needed: send Authorization: Bearer <token>');
    const v = await ctx.verifier.verify(token);
    if (!v.ok) {
      if (v.reason === 'revoked' && v.tokenId) ctx.audit.record({ actor: v.tokenId, action: 'token.refused', target: routeOf(request), details: { reason: 'revoked' } });
      return deny(reply, 401, 'unauthorized', v.reason === 'revoked' ? 'this token was revoked' : 'this token is not valid');
    }
    request.principal = v.principal;
  };
}

/** The route pattern and method (never the query string: a page URL may carry a token). */
export function routeOf(request: FastifyRequest): string {
  return `${request.method} ${request.routeOptions.url ?? request.url.split('?')[0]}`;
}

/** Records every request made with a valid token in the audit log (actor = token id). */
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
