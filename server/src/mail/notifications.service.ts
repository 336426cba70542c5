import { type DataSource, In, type Repository } from 'typeorm';
import { type Role, User } from '../users/user.entity';
import { NotificationSettingsRow } from './mail.entity';

export interface NotificationSettings {
  batchComplete: boolean;
  qcFailure: boolean;
  batchApproved: boolean;
}

export type NotificationKind = keyof NotificationSettings;

export const DEFAULT_NOTIFICATION_SETTINGS: NotificationSettings = {
  batchComplete: true,
  qcFailure: true,
  batchApproved: true,
};

export interface Recipient {
  id: number;
  email: string;
  displayName: string;
}

/** Which mails each person wants, and who gets a given kind of mail. */
export class NotificationsService {
  private readonly settings: Repository<NotificationSettingsRow>;
  private readonly users: Repository<User>;

  constructor(dataSource: DataSource) {
    this.settings = dataSource.getRepository(NotificationSettingsRow);
    this.users = dataSource.getRepository(User);
  }

  async get(userId: number): Promise<NotificationSettings> {
    const row = await this.settings.findOneBy({ userId });
    return row
      ? { batchComplete: row.batchComplete, qcFailure: row.qcFailure, batchApproved: row.batchApproved }
      : { ...DEFAULT_NOTIFICATION_SETTINGS };
  }

  async update(userId: number, changes: Partial<NotificationSettings>): Promise<NotificationSettings> {
    const next = { ...(await this.get(userId)), ...changes };
    await this.settings.save(this.settings.create({ userId, ...next, updatedAt: new Date().toISOString() }));
    return next;
  }

  /** Active people with one of the roles (plus the extra ids, whatever their role) who want this kind. */
  async recipients(kind: NotificationKind, roles: Role[], extraUserIds: number[] = []): Promise<Recipient[]> {
    const people = await this.users.find({
      where: [
        { role: In(roles), active: true },
        ...(extraUserIds.length ? [{ id: In(extraUserIds), active: true }] : []),
      ],
      order: { id: 'ASC' },
    });
    if (!people.length) return [];
    const rows = await this.settings.findBy({ userId: In(people.map((p) => p.id)) });
    const optedOut = new Set(rows.filter((r) => !r[kind]).map((r) => r.userId));
    return people
      .filter((p) => !optedOut.has(p.id))
      .map((p) => ({ id: p.id, email: p.email, displayName: p.displayName }));
  }
}
