import { BATCH_READER_ROLES } from '../batches/batches.router';
import { INTAKE_ROLES } from '../ingest/intake.router';
import type { Role } from '../users/user.entity';
import type { LiveEvent, LiveEventData, LiveEventType } from '../contracts/events';

/** What one group of roles sees of an event: the data to send, or null for nothing. */
interface EventView<T extends LiveEventType> {
  roles: readonly Role[];
  view: (data: LiveEventData<T>) => LiveEventData<T> | null;
}

const everything = <D>(data: D): D => data;

/**
 * The one table of who sees which live event, and which of its fields. The role lists are the ones the
 * REST routers check, so an event never tells a person more than GET would: received files and
 * quarantine messages go to Intake's roles only; batch readers learn that a batch changed (and which
 * file landed in it), nothing about the file's content or instrument.
 * The first view whose roles include the person's role applies.
 */
export const EVENT_ACCESS: { [T in LiveEventType]: readonly EventView<T>[] } = {
  'file.received': [{ roles: INTAKE_ROLES, view: everything }],
  'file.duplicate': [{ roles: INTAKE_ROLES, view: everything }],
  'file.quarantined': [{ roles: INTAKE_ROLES, view: everything }],
  'file.stored': [
    { roles: INTAKE_ROLES, view: everything },
    {
      roles: BATCH_READER_ROLES,
      view: ({ id, batchId }) => (typeof batchId === 'number' ? { id, batchId } : null),
    },
  ],
  'batch.comment': [{ roles: BATCH_READER_ROLES, view: everything }],
  'batch.updated': [
    {
      roles: BATCH_READER_ROLES,
      view: ({ id, state }) => (state === undefined ? { id } : { id, state }),
    },
  ],
};

/** The event as a person with this role may see it, or null when they may not see it at all. */
export function eventForRole(role: Role, event: LiveEvent): LiveEvent | null {
  const views = EVENT_ACCESS[event.type] as readonly EventView<LiveEventType>[] | undefined;
  const rule = views?.find((r) => r.roles.includes(role));
  const data = rule?.view(event.data) ?? null;
  return data ? ({ ...event, data } as LiveEvent) : null;
}
