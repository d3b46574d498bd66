// Services exposed on MessageChannels in this realm, as the worker exposes them across
// threads: what the worker and store tests talk to instead of real Workers.
import { expose } from 'comlink';
import { CoreClient } from '../../src/worker/client.ts';
import { library } from '../../src/worker/library.ts';
import { createCoreService } from '../../src/worker/service.ts';

// Every service in one realm drives the same wasm core, as jobs of one worker do.
const ports: MessagePort[] = [];

/** A port whose other end has a service exposed on it. */
export function serviceEndpoint(): MessagePort {
  const channel = new MessageChannel();
  ports.push(channel.port1, channel.port2);
  expose(createCoreService(library), channel.port1);
  return channel.port2;
}

/** A client over one analysis and two design services, as on a two-core machine. */
export function inRealmClient(): CoreClient {
  return new CoreClient(serviceEndpoint(), [serviceEndpoint(), serviceEndpoint()]);
}

/** Closes every port opened here (call from afterAll, or the test process lingers). */
export function closePorts(): void {
  ports.forEach((p) => p.close());
  ports.length = 0;
}
