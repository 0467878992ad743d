// @vitest-environment node
// A real HTTP server, not a stubbed fetch: the wrapper is tested against real answers.
import { createServer, type IncomingMessage, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiFailure, createHttpClient, failureMessage, type HttpClient } from '@/services/http';

interface Seen {
  method?: string;
  url?: string;
  contentType?: string;
  body: string;
}

let server: Server;
let client: HttpClient;
let origin: string;
let lastSeen: Seen = { body: '' };

function readBody(req: IncomingMessage): Promise<string> {
  return new Promise((resolve) => {
    let text = '';
    req.on('data', (chunk: Buffer) => (text += chunk.toString()));
    req.on('end', () => resolve(text));
  });
}

beforeAll(async () => {
  server = createServer(async (req, res) => {
    lastSeen = { method: req.method, url: req.url, contentType: req.headers['content-type'], body: await readBody(req) };
    const json = (status: number, body: unknown) => {
      res.writeHead(status, { 'Content-Type': 'application/json' });
      res.end(JSON.stringify(body));
    };
    switch (req.url?.split('?')[0]) {
      case '/ok':
        return json(200, { hello: 'crew', echo: lastSeen.body ? JSON.parse(lastSeen.body) : null });
      case '/no-content':
        res.writeHead(204);
        return res.end();
      case '/wrong-password':
        return json(401, { error: { code: 'unauthenticated', message: 'E-mail or password is wrong' } });
      case '/bad-input':
        return json(400, { error: { code: 'bad-input', message: 'Check the form', fields: { email: ['Enter an e-mail address'] } } });
      case '/throttled':
        return json(429, { error: { code: 'too-many-requests', message: 'Too many sign-in attempts. Try again in 15 minutes.' } });
      case '/throttled-plain':
        res.writeHead(429, { 'Content-Type': 'text/plain' });
        return res.end('Too many requests, please try again later.');
      case '/last-admin':
        return json(409, { error: { code: 'conflict', message: 'The venue needs at least one technical director.' } });
      case '/proxy-page':
        res.writeHead(502, { 'Content-Type': 'text/html' });
        return res.end('<html><body>Bad gateway</body></html>');
      case '/not-json':
        res.writeHead(200, { 'Content-Type': 'text/html' });
        return res.end('<html></html>');
      default:
        return json(404, { error: { code: 'not-found', message: 'Not found' } });
    }
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  client = createHttpClient({ baseUrl: origin });
});

afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

async function failureOf(promise: Promise<unknown>): Promise<ApiFailure> {
  const error = await promise.then(
    () => null,
    (reason: unknown) => reason,
  );
  expect(error).toBeInstanceOf(ApiFailure);
  return error as ApiFailure;
}

describe('http wrapper', () => {
  describe('on success', () => {
    it('sends JSON and answers with the parsed body', async () => {
      const answer = await client.post<{ hello: string; echo: unknown }>('/ok', { email: 'rail@larkspur.example' });
      expect(answer).toEqual({ hello: 'crew', echo: { email: 'rail@larkspur.example' } });
      expect(lastSeen.method).toBe('POST');
      expect(lastSeen.contentType).toBe('application/json');
    });

    it('adds query values to the path', async () => {
      await client.get('/ok', { query: { active: 1, skip: undefined } });
      expect(lastSeen.url).toBe('/ok?active=1');
    });

    it('answers undefined for 204 No Content', async () => {
      await expect(client.post('/no-content')).resolves.toBeUndefined();
    });
  });

  describe('on an error answer', () => {
    it('turns the error body into a typed ApiFailure with the server message', async () => {
      const failure = await failureOf(client.post('/wrong-password', {}));
      expect(failure.status).toBe(401);
      expect(failure.code).toBe('unauthenticated');
      expect(failure.message).toBe('E-mail or password is wrong');
      expect(failureMessage(failure)).toBe('E-mail or password is wrong');
    });

    it('keeps field problems of bad input', async () => {
      const failure = await failureOf(client.post('/bad-input', {}));
      expect(failure.code).toBe('bad-input');
      expect(failure.fields).toEqual({ email: ['Enter an e-mail address'] });
      expect(failure.fieldError('email')).toBe('Enter an e-mail address');
      expect(failure.fieldError('password')).toBeUndefined();
    });

    it('passes the throttling message on 429', async () => {
      const failure = await failureOf(client.post('/throttled', {}));
      expect(failure.status).toBe(429);
      expect(failure.code).toBe('too-many-requests');
      expect(failure.message).toBe('Too many sign-in attempts. Try again in 15 minutes.');
    });

    it('words a 429 without our JSON body from its status', async () => {
      const failure = await failureOf(client.post('/throttled-plain', {}));
      expect(failure.code).toBe('too-many-requests');
      expect(failure.message).toMatch(/wait a minute/i);
    });

    it('passes the conflict message for removing the last technical director', async () => {
      const failure = await failureOf(client.put('/last-admin', { roles: [] }));
      expect(failure.status).toBe(409);
      expect(failure.code).toBe('conflict');
      expect(failure.message).toBe('The venue needs at least one technical director.');
    });

    it('answers a not-found failure for 404', async () => {
      const failure = await failureOf(client.get('/nothing-here'));
      expect(failure.status).toBe(404);
      expect(failure.code).toBe('not-found');
    });

    it('gives plain words for a proxy error page instead of its HTML', async () => {
      const failure = await failureOf(client.get('/proxy-page'));
      expect(failure.status).toBe(502);
      expect(failure.code).toBe('internal');
      expect(failure.message).not.toContain('<');
    });

    it('refuses a success answer that is not JSON', async () => {
      const failure = await failureOf(client.get('/not-json'));
      expect(failure.code).toBe('internal');
    });
  });

  describe('without an answer', () => {
    it('reports a network failure when the server cannot be reached', async () => {
      const closed = createServer();
      await new Promise<void>((resolve) => closed.listen(0, '127.0.0.1', resolve));
      const port = (closed.address() as AddressInfo).port;
      await new Promise<void>((resolve) => closed.close(() => resolve()));
      const failure = await failureOf(createHttpClient({ baseUrl: `http://127.0.0.1:${port}` }).get('/ok'));
      expect(failure.status).toBe(0);
      expect(failure.code).toBe('network');
      expect(failure.message).toMatch(/cannot reach the server/i);
    });
  });
});
