import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { AppError, errorMiddleware } from '../../server/errors';
import type { Logger } from '../../server/log';

function appThrowing(err: unknown, logged: string[]) {
  const log: Logger = { info: () => {}, error: (m, e) => logged.push(`${m} ${e instanceof Error ? e.message : String(e)}`) };
  const app = express();
  app.use((_req, res, next) => { res.locals.requestId = 'req-123'; next(); });
  app.use(express.json());
  app.post('/boom', () => { throw err; });
  app.use(errorMiddleware(log));
  return app;
}

describe('the error middleware', () => {
  it('answers an AppError with its status, code, message and fields', async () => {
    const res = await request(appThrowing(new AppError('study-archived', 'Archived studies are read-only', 409, { a: 'b' }), []))
      .post('/boom').send({});
    // Foundation issue: {error:{code,message,fields?}}.
    expect([res.status, res.body]).toEqual([409, { error: { code: 'study-archived', message: 'Archived studies are read-only', fields: { a: 'b' } } }]);
  });

  it('turns a thrown ZodError into 400 validation with field paths', async () => {
    const parsed = z.object({ a: z.object({ b: z.number() }) }).safeParse({ a: { b: 'x' } });
    const res = await request(appThrowing(parsed.error, [])).post('/boom').send({});
    // Foundation issue: zod failures -> 400 'validation' with fields {path: message}.
    expect([res.status, res.body.error.code, Object.keys(res.body.error.fields)]).toEqual([400, 'validation', ['a.b']]);
  });

  it('hides an unknown error behind a generic 500 that names the request id, and logs it without the body', async () => {
    const logged: string[] = [];
    const res = await request(appThrowing(new Error('db exploded at /secret/path'), logged)).post('/boom')
      .send({ password: 'hunter2-hunter2' });
    // Foundation issue: unknown -> 500 generic, logged with a request id, no stack to clients, no bodies in logs.
    expect(res.status).toBe(500);
    expect(res.body).toEqual({ error: { code: 'internal', message: 'Something went wrong (request req-123)' } });
    expect(JSON.stringify(res.body)).not.toContain('exploded');
    expect(logged).toHaveLength(1);
    expect(logged[0]).toContain('req-123');
    expect(logged[0]).toContain('db exploded');
    expect(logged[0]).not.toContain('hunter2');
  });

  it('maps malformed JSON from the body parser to 400 invalid-json', async () => {
    const res = await request(appThrowing(new Error('unreached'), [])).post('/boom').set('Content-Type', 'application/json').send('{');
    // Foundation issue: malformed JSON -> 400 'invalid-json'.
    expect([res.status, res.body.error.code]).toEqual([400, 'invalid-json']);
  });
});
