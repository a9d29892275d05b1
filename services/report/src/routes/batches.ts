import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Readable } from 'node:stream';
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { batchSubmitter } from '@stemwise/db';
import { batchIssuesCsv, batchReport, checkDelimiter, SubmissionError, submitBatch, type SubmitOptions, type SubmittedFile } from '@stemwise/core';
import { canReadBatch, canSubmitBatches, type Principal } from '../access';
import { multipartBoundary, MultipartError, readMultipart } from '../multipart';
import { denyJson, requireToken, type RouteContext } from './auth';
import { BatchParams, ErrorBody } from './schemas';

const FILE_FIELDS = ['plots', 'trees', 'strata', 'species'] as const;
const OPTION_FIELDS = ['skip_invalid', 'replace', 'delimiter', 'decimal_comma'] as const;

const Submitted = z.object({
  id: z.string(),
  state: z.string(),
  duplicate: z.boolean().describe('the same content is already a live batch: its id is returned, nothing new is loaded'),
  queued: z.boolean().describe('false when the job could not be queued yet (it is picked up by the reconciler)'),
  links: z.object({ self: z.string(), errors_csv: z.string() }),
});

function flag(fields: Record<string, string>, name: string): boolean {
  const v = fields[name];
  if (v === undefined || v === '') return false;
  if (/^(true|1|yes|on)$/i.test(v)) return true;
  if (/^(false|0|no|off)$/i.test(v)) return false;
  throw new SubmissionError(`${name} must be true or false, not '${v}'`);
}

function submitOptions(fields: Record<string, string>): SubmitOptions {
  const delimiter = fields.delimiter;
  return { skipInvalid: flag(fields, 'skip_invalid'), replace: flag(fields, 'replace'), delimiter: checkDelimiter(delimiter), decimalComma: flag(fields, 'decimal_comma') };
}

/** A client that went away in the middle of its upload (the body stream ended with an error). */
function interrupted(err: unknown): boolean {
  const code = (err as { code?: string }).code;
  return code === 'ECONNRESET' || code === 'ERR_STREAM_PREMATURE_CLOSE' || (err as Error).message === 'aborted';
}

export function batchRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  const security = [{ bearer: [] }];
  const { maxUploadBytes, maxConcurrentUploads, storageDir } = ctx.deps.config;
  const mib = Math.round(maxUploadBytes / 1024 ** 2);
  let receiving = 0;

  // A declared size over the cap is refused before anything else, and the connection is closed so
  // the body is never read (bigger inventories go through `stemwise upload`).
  const refuseDeclaredSize = async (request: FastifyRequest, reply: FastifyReply) => {
    const declared = Number(request.headers['content-length']);
    if (Number.isFinite(declared) && declared > maxUploadBytes) {
      return reply.code(413).header('connection', 'close').send({ error: 'too_large', message: `the upload is larger than ${mib} MiB (STEMWISE_MAX_UPLOAD_MB); use \`stemwise upload\` for bigger batches` });
    }
  };

  // The body stays a stream: the route reads it part by part to disk (fastify's body limit does not apply).
  app.addContentTypeParser('multipart/form-data', (_request, payload, done) => done(null, payload));

  r.post(
    '/v1/batches',
    {
      onRequest: refuseDeclaredSize,
      preValidation: requireToken(ctx, { cookie: false }),
      schema: {
        summary: 'Submit a batch (admin or uploader)',
        description:
          'multipart/form-data with file parts `plots` and `trees` (required), `strata` and `species` (optional), each CSV or gzip-compressed CSV, ' +
          'and optional text fields `skip_invalid`, `replace`, `decimal_comma` (true/false) and `delimiter` (`,` or `;`). ' +
          `At most ${mib} MiB in all (413 beyond; a larger Content-Length is refused before the body is read); ` +
          `at most ${maxConcurrentUploads} uploads at once (503 with Retry-After beyond). Answers 202 with the batch id (200 when the same content is already a batch); ` +
          'follow it at GET /v1/batches/{id}.',
        tags: ['batches'],
        security,
        consumes: ['multipart/form-data'],
        response: { 200: Submitted, 202: Submitted, 400: ErrorBody, 401: ErrorBody, 403: ErrorBody, 413: ErrorBody, 415: ErrorBody, 429: ErrorBody, 503: ErrorBody },
      },
    },
    async (request, reply) => {
      const p = request.principal as Principal;
      if (!canSubmitBatches(p)) return denyJson(reply, 403, 'forbidden', 'submitting batches needs an uploader or admin token');
      const boundary = multipartBoundary(request.headers['content-type']);
      if (!boundary || !request.body) {
        return reply.code(415).send({ error: 'unsupported_media_type', message: 'send the files as multipart/form-data (parts plots, trees, and optionally strata, species)' });
      }
      if (receiving >= maxConcurrentUploads) {
        return reply
          .code(503)
          .header('retry-after', '30')
          .header('connection', 'close')
          .send({ error: 'busy', message: `${maxConcurrentUploads} uploads are being received (STEMWISE_MAX_CONCURRENT_UPLOADS); try again in a little while` });
      }
      receiving++;
      // Spooled inside the storage folder (same file system), so each file is then moved, not copied, into its batch folder.
      const spool = path.join(storageDir, '.incoming', crypto.randomUUID());
      try {
        const { files, fields } = await readMultipart(request.body as Readable, boundary, spool, {
          maxBytes: maxUploadBytes,
          fileFields: FILE_FIELDS,
          textFields: OPTION_FIELDS,
        });
        const submitted: SubmittedFile[] = files.map((f) => ({ kind: f.field as SubmittedFile['kind'], name: f.filename, source: f.path, move: true }));
        const result = await submitBatch(ctx.deps, submitted, submitOptions(fields), p.tokenId);
        const links = { self: `/v1/batches/${result.batchId}`, errors_csv: `/v1/batches/${result.batchId}/errors.csv` };
        return reply.code(result.duplicate ? 200 : 202).send({ id: result.batchId, state: result.state, duplicate: result.duplicate, queued: result.queued, links });
      } catch (err) {
        if (err instanceof MultipartError) return reply.code(err.status).send({ error: err.status === 413 ? 'too_large' : 'bad_request', message: err.message });
        if (err instanceof SubmissionError) return reply.code(400).send({ error: 'bad_request', message: err.message });
        if (interrupted(err)) return reply.code(400).send({ error: 'bad_request', message: 'the upload was interrupted before its end; nothing was stored' });
        throw err;
      } finally {
        receiving--;
        await fs.promises.rm(spool, { recursive: true, force: true });
      }
    },
  );

  const readBatch = async (id: string, p: Principal, reply: FastifyReply): Promise<boolean> => {
    if (p.role === 'reader') {
      denyJson(reply, 403, 'forbidden', 'batches are for uploader and admin tokens');
      return false;
    }
    const by = await batchSubmitter(ctx.deps.db, id);
    if (by === null) {
      denyJson(reply, 404, 'not_found', `no batch ${id}`);
      return false;
    }
    if (!canReadBatch(p, by)) {
      denyJson(reply, 403, 'forbidden', 'an uploader token reads only the batches it submitted');
      return false;
    }
    return true;
  };

  r.get(
    '/v1/batches/:id',
    {
      preValidation: requireToken(ctx, { cookie: true }),
      schema: {
        summary: "A batch's state, counts, progress, failure reason and row issues by rule (admin, or the uploader that submitted it)",
        tags: ['batches'],
        security,
        params: BatchParams,
        response: { 200: z.record(z.string(), z.unknown()), 401: ErrorBody, 403: ErrorBody, 404: ErrorBody },
      },
    },
    async (request, reply) => {
      if (!(await readBatch(request.params.id, request.principal as Principal, reply))) return reply;
      const report = await batchReport(ctx.deps.db, request.params.id);
      if (!report) return denyJson(reply, 404, 'not_found', `no batch ${request.params.id}`);
      return reply.type('application/json; charset=utf-8').send(JSON.stringify(report) as never);
    },
  );

  r.get(
    '/v1/batches/:id/errors.csv',
    {
      preValidation: requireToken(ctx, { cookie: true }),
      schema: {
        summary: "A batch's row errors as CSV; `?severity=all` adds the warnings (admin, or the uploader that submitted it)",
        tags: ['batches'],
        security,
        params: BatchParams,
        querystring: z.object({ severity: z.enum(['error', 'warning', 'all']).optional() }),
        produces: ['text/csv'],
        response: { 401: ErrorBody, 403: ErrorBody, 404: ErrorBody },
      },
    },
    async (request, reply) => {
      if (!(await readBatch(request.params.id, request.principal as Principal, reply))) return reply;
      const csv = await batchIssuesCsv(ctx.deps.db, request.params.id, request.query.severity ?? 'error');
      if (csv === null) return denyJson(reply, 404, 'not_found', `no batch ${request.params.id}`);
      return reply
        .type('text/csv; charset=utf-8')
        .header('content-disposition', `attachment; filename="batch-${request.params.id}-issues.csv"`)
        .send(csv as never);
    },
  );
}
