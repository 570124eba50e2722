// The Outbox (administrators): messages the local fake SMTP server received.
import { getOutboxMessage, listOutboxMessages } from '../../db/queries/outbox';
import { NotFoundError } from '../errors';
import { toOutboxMessage, toOutboxSummary } from '../dto';
import { route, type RouteDef } from './registry';

export function outboxRoutes(): RouteDef[] {
  return [
    route('outbox.list', async ({ deps, query }) => ({
      messages: (await listOutboxMessages(deps.db, { limit: query.limit, to: query.to })).map(toOutboxSummary),
    })),
    route('outbox.get', async ({ deps, params }) => {
      const m = await getOutboxMessage(deps.db, { id: params.id });
      if (!m) throw new NotFoundError(`No message with id ${params.id}`);
      return { message: toOutboxMessage(m) };
    }),
  ];
}
