// Test servers listen on the loopback interface only (tests touch no other network), on a port the
// system picks: one way to start one and name its base URL.
import type { AddressInfo, Server } from 'node:net';

/** Starts server on host (127.0.0.1 by default) at a free port; resolves with `http://host:port`. */
export function listenLoopback(server: Server, host = '127.0.0.1'): Promise<string> {
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, host, () => resolve(`http://${host}:${(server.address() as AddressInfo).port}`));
  });
}
