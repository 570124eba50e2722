// People (administrators): list, change role, disable / enable. Disabling ends the person's
// sessions at once; Keel always keeps at least one active administrator.
import { recordAudit } from '../../db/queries/audit';
import {
  countActiveAdmins,
  deleteSessionsOfPerson,
  findPersonById,
  listPeople,
  lockActiveAdmins,
  updatePerson,
} from '../../db/queries/people';
import { ConflictError, NotFoundError } from '../errors';
import { toPerson } from '../dto';
import { route, type RouteDef } from './registry';

export function peopleRoutes(): RouteDef[] {
  return [
    route('people.list', async ({ deps }) => ({ people: (await listPeople(deps.db)).map(toPerson) })),

    route('people.update', async ({ deps, params, body, person: actor, ip }) => {
      const updated = await deps.db.transaction(async (tx) => {
        await lockActiveAdmins(tx);
        const before = await findPersonById(tx, { id: params.id });
        if (!before) throw new NotFoundError(`No person with id ${params.id}`);
        if (body.disabled === true && before.id === actor!.id) {
          throw new ConflictError('You cannot disable your own account', [{ path: 'disabled', message: 'Not for your own account' }]);
        }
        const after = await updatePerson(tx, { id: before.id, role: body.role, disabled: body.disabled });
        if (!after) throw new NotFoundError(`No person with id ${params.id}`);
        if ((await countActiveAdmins(tx)) === 0) {
          throw new ConflictError('Keel needs at least one active administrator', [
            { path: body.role !== undefined ? 'role' : 'disabled', message: 'This is the last active administrator' },
          ]);
        }
        if (body.role !== undefined && body.role !== before.role) {
          await recordAudit(tx, {
            personId: actor!.id,
            action: 'person.role',
            target: `person:${before.id}`,
            details: { from: before.role, to: after.role },
            ip,
          });
        }
        if (body.disabled !== undefined && body.disabled !== before.disabled) {
          const ended = after.disabled ? await deleteSessionsOfPerson(tx, { personId: before.id }) : 0;
          await recordAudit(tx, {
            personId: actor!.id,
            action: after.disabled ? 'person.disable' : 'person.enable',
            target: `person:${before.id}`,
            details: after.disabled ? { sessionsEnded: ended } : {},
            ip,
          });
        }
        return after;
      });
      return { person: toPerson(updated) };
    }),
  ];
}
