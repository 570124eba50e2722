// GET /api/events: the live-event stream (Server-Sent Events) for any signed-in person.
import { liveBus, trackStream } from '../events/live';
import { streamEvents } from '../events/sse';
import { route, type RouteDef } from './registry';

export function eventRoutes(): RouteDef[] {
  return [
    route('events.stream', async ({ deps, req, res }) => {
      trackStream(res);
      await streamEvents(req, res, liveBus(deps));
      return undefined;
    }),
  ];
}
