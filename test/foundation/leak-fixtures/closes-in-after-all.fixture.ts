import net from 'node:net';
import { afterAll, beforeAll, expect, test } from 'vitest';

// Opens a server and a client in beforeAll and closes them in its own afterAll: the leak check must run
// after that afterAll and so find nothing.
let server: net.Server;
let client: net.Socket;
let timer: NodeJS.Timeout;

beforeAll(async () => {
  server = net.createServer((s) => s.on('error', () => {}));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const { port } = server.address() as net.AddressInfo;
  client = net.connect(port, '127.0.0.1');
  await new Promise((r) => client.once('connect', r));
  timer = setInterval(() => {}, 1000);
});

afterAll(async () => {
  clearInterval(timer);
  client.destroy();
  await new Promise((r) => server.close(r));
});

test('holds a server, a socket and an interval while it runs', () => {
  expect(client.readyState).toBe('open');
});
