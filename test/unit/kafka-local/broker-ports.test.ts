import net from 'node:net';
import { describe, expect, it } from 'vitest';
import { portProblemsOf } from '../../../scripts/kafka-local/broker-lifecycle.ts';
import { freePort } from '../../../scripts/kafka-local/preconditions.ts';

const hold = (port: number) =>
  new Promise<net.Server>((resolve) => {
    const server = net.createServer();
    server.listen({ port, host: '127.0.0.1', exclusive: true }, () => resolve(server));
  });

describe('the broker ports', () => {
  it('refuses at once a port something listens on, naming it and its role', async () => {
    const [client, controller] = [await freePort(), await freePort()];
    const server = await hold(client);
    try {
      const problems = await portProblemsOf(client, controller, 0);
      expect(problems).toEqual([expect.stringContaining(`client port 127.0.0.1:${client} is not free`)]);
    } finally {
      server.close();
    }
  });

  it('waits for a port a killed broker still holds for a moment (a restart on the same ports)', async () => {
    const [client, controller] = [await freePort(), await freePort()];
    const server = await hold(controller);
    setTimeout(() => server.close(), 500);
    expect(await portProblemsOf(client, controller, 5_000)).toEqual([]);
  });
});
