// GET /api/events: the live-event stream (Server-Sent Events) for any signed-in person. A stream
// outlives the request that opened it, so it is re-checked every few seconds and ended once its
// session is gone (signed out, ended by a password reset or by disabling the person) or the
// person is disabled.
import type { Request } from 'express';
import type { SessionData } from 'express-session';
import { findPersonById } from '../../db/queries/people';
import type { Deps } from '../deps';
import { liveBus, trackStream } from '../events/live';
import { streamEvents } from '../events/sse';
import { route, type RouteDef } from './registry';

async function stillSignedIn(deps: Deps, req: Request, personId: number): Promise<boolean> {
  const sid = req.sessionID;
  const sess = await new Promise<(SessionData & { passport?: { user?: unknown } }) | null | undefined>((resolve, reject) =>
    req.sessionStore.get(sid, (err, s) => (err ? reject(err) : resolve(s))),
  );
  if (!sess || sess.passport?.user !== personId) return false;
  const person = await findPersonById(deps.db, { id: personId });
  return !!person && !person.disabled;
}

export function eventRoutes(): RouteDef[] {
  return [
    route('events.stream', async ({ deps, req, res, person }) => {
      trackStream(res);
      const personId = person!.id;
      await streamEvents(req, res, liveBus(deps), { revalidate: () => stillSignedIn(deps, req, personId) });
      return undefined;
    }),
  ];
}
