import net from 'node:net';
import { expect, test } from 'vitest';

// Leaves a server, a client socket and an interval open: the leak check must fail this file.
test('opens and never closes', async () => {
  const server = net.createServer((s) => s.on('error', () => {}));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const client = net.connect((server.address() as net.AddressInfo).port, '127.0.0.1');
  await new Promise((r) => client.once('connect', r));
  setInterval(() => {}, 1000);
  expect(client.readyState).toBe('open');
});
