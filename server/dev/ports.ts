/**
 * A free loopback port, for servers that must know their port before they start (their origin goes
 * into their own and the identity provider's configuration). The port is chosen below the kernel's
 * ephemeral range: a port taken from that range and let go could be handed to any outgoing
 * connection (a database client of a test running beside) before the server listens on it, which
 * failed a suite with EADDRINUSE. Each candidate is tried by listening on it before it is answered.
 */
import { readFileSync } from 'node:fs';
import net from 'node:net';

const LOWEST = 10_000;

/** The first port of the kernel's ephemeral range (Linux's default when it cannot be read). */
function ephemeralLow(): number {
  try {
    const [low] = readFileSync('/proc/sys/net/ipv4/ip_local_port_range', 'utf8').trim().split(/\s+/).map(Number);
    return Number.isInteger(low) ? low : 32_768;
  } catch {
    return 32_768;
  }
}

function listenOn(port: number): Promise<number | undefined> {
  return new Promise((resolve) => {
    const server = net.createServer();
    server.unref();
    server.once('error', () => resolve(undefined));
    server.listen(port, '127.0.0.1', () => {
      const { port: bound } = server.address() as net.AddressInfo;
      server.close(() => resolve(bound));
    });
  });
}

export async function freePort(): Promise<number> {
  const below = ephemeralLow();
  for (let attempt = 0; below - LOWEST > 100 && attempt < 50; attempt += 1) {
    const port = await listenOn(LOWEST + Math.floor(Math.random() * (below - LOWEST)));
    if (port !== undefined) return port;
  }
  // No room below the range (an unusual kernel setting): any port the kernel gives.
  const port = await listenOn(0);
  if (port === undefined) throw new Error('no free loopback port');
  return port;
}
