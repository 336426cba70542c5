import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';
import type { DataSource, EntityManager, Repository } from 'typeorm';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import { PASSWORD_HASH_ROUNDS } from '../config';
import { normaliseEmail } from '../contracts/email-address';
import { type PublicUser, type Role, User, toPublicUser } from './user.entity';
import type { CreateUserInput, UpdateUserInput } from '../contracts/users';

const SET_PASSWORD_TTL_MS = 72 * 3_600_000;
const RESET_PASSWORD_TTL_MS = 2 * 3_600_000;
export const SET_PASSWORD_TTL_HOURS = SET_PASSWORD_TTL_MS / 3_600_000;
export const RESET_PASSWORD_TTL_HOURS = RESET_PASSWORD_TTL_MS / 3_600_000;

export function hashPassword(password: string, rounds = PASSWORD_HASH_ROUNDS): Promise<string> {
  return bcrypt.hash(password, rounds);
}

function sha256(text: string): string {
  return crypto.createHash('sha256').update(text).digest('hex');
}

export interface CreatedUser {
  user: PublicUser;
  /** Present for an invitation: the one-time token for the set-password link. Shown once. */
  setPasswordToken?: string;
}

/** Ends a person's sessions (the session store); absent where no sessions exist, e.g. in scripts. */
export interface SessionEnder {
  destroyAllOf(userId: number, exceptSessionId?: string): Promise<number>;
}

/** People: who may sign in, with which role. */
export class UsersService {
  private readonly users: Repository<User>;
  private readonly invitationListeners: ((user: PublicUser, token: string) => void)[] = [];
  private readonly accessListeners: ((userId: number) => void)[] = [];

  constructor(
    private readonly dataSource: DataSource,
    private readonly sessions?: SessionEnder,
    private readonly audit?: AuditService,
    /** bcrypt's cost for new hashes (config.passwordHashRounds). */
    private readonly hashRounds = PASSWORD_HASH_ROUNDS,
  ) {
    this.users = dataSource.getRepository(User);
  }

  /** A hash of the cost this service writes, compared against when no such person exists. */
  private dummyHash: string | undefined;

  /** Runs a change with its audit entry in one transaction (no entry without an actor, e.g. the demo seed). */
  private async audited<T>(
    actor: Actor | undefined,
    change: (manager: EntityManager) => Promise<{ value: T; entry: AuditEntryOf | null }>,
  ): Promise<T> {
    return this.dataSource.transaction(async (manager) => {
      const { value, entry } = await change(manager);
      if (actor && entry && this.audit) await this.audit.record({ actor, entity: 'user', ...entry }, manager);
      return value;
    });
  }

  async list(): Promise<PublicUser[]> {
    const rows = await this.users.find({ order: { displayName: 'ASC' } });
    return rows.map(toPublicUser);
  }

  async count(): Promise<number> {
    return this.users.count();
  }

  async findById(id: number): Promise<User | null> {
    return this.users.findOneBy({ id });
  }

  /** Check an e-mail and password; answers the same vague message for every failure. */
  async verifyCredentials(email: string, password: string): Promise<User> {
    const user = await this.users.findOneBy({ email: normaliseEmail(email) });
    // Compare against a dummy hash when there is no user so timing does not reveal who exists.
    this.dummyHash ??= await hashPassword('no such person', this.hashRounds);
    const hash = user?.passwordHash ?? this.dummyHash;
    const matches = await bcrypt.compare(password, hash);
    if (!user || !user.passwordHash || !matches)
      throw AppError.unauthorized('E-mail or password is not correct.');
    if (!user.active) throw AppError.unauthorized('This account is deactivated; ask an administrator.');
    return user;
  }

  /** A new person; `actor` (the admin) is named in the audit trail: `create` or `invite`. */
  async create(input: CreateUserInput, actor?: Actor): Promise<CreatedUser> {
    const email = normaliseEmail(input.email);
    if (await this.users.existsBy({ email })) {
      throw AppError.conflict(`A person with e-mail ${email} already exists.`);
    }
    const user = this.users.create({
      email,
      displayName: input.displayName,
      role: input.role as Role,
      active: true,
      passwordHash: input.password ? await hashPassword(input.password) : null,
      setPasswordTokenHash: null,
      setPasswordExpiresAt: null,
    });
    let setPasswordToken: string | undefined;
    if (!input.password) {
      setPasswordToken = crypto.randomBytes(24).toString('base64url');
      user.setPasswordTokenHash = sha256(setPasswordToken);
      user.setPasswordExpiresAt = Date.now() + SET_PASSWORD_TTL_MS;
    }
    await this.audited(actor, async (manager) => {
      await manager.getRepository(User).save(user);
      const summary = setPasswordToken
        ? `Invited ${email} as ${user.role} (set-password link sent)`
        : `Added ${email} as ${user.role}`;
      const after = { email, displayName: user.displayName, role: user.role, active: true };
      return {
        value: undefined,
        entry: { action: setPasswordToken ? 'invite' : 'create', entityId: user.id, summary, after },
      };
    });
    if (setPasswordToken)
      for (const listener of this.invitationListeners) listener(toPublicUser(user), setPasswordToken);
    return { user: toPublicUser(user), setPasswordToken };
  }

  /** Called after a person is created without a password, with the one-time token (the invitation mail). */
  onInvitation(listener: (user: PublicUser, token: string) => void): void {
    this.invitationListeners.push(listener);
  }

  /** Called after a person's role changes or they are deactivated (open live connections end). */
  onAccessChange(listener: (userId: number) => void): void {
    this.accessListeners.push(listener);
  }

  /**
   * A one-time password-reset token for the active person with this e-mail, replacing any pending one;
   * null when there is no such person (the caller must not reveal which).
   */
  async issueResetToken(email: string): Promise<{ user: PublicUser; token: string } | null> {
    const user = await this.users.findOneBy({ email: normaliseEmail(email) });
    if (!user || !user.active) return null;
    const token = crypto.randomBytes(24).toString('base64url');
    await this.users.update(
      { id: user.id },
      { setPasswordTokenHash: sha256(token), setPasswordExpiresAt: Date.now() + RESET_PASSWORD_TTL_MS },
    );
    return { user: toPublicUser(user), token };
  }

  /** Name, role or active state; role changes and (de)activations are audited with before and after. */
  async update(id: number, input: UpdateUserInput, actor: Actor): Promise<PublicUser> {
    const actingUserId = actor.id;
    const user = await this.findById(id);
    if (!user) throw AppError.notFound(`No person with id ${id}.`);
    const losesAdmin =
      user.role === 'admin' &&
      user.active &&
      (input.active === false || (input.role && input.role !== 'admin'));
    if (losesAdmin) {
      const activeAdmins = await this.users.countBy({ role: 'admin', active: true });
      if (activeAdmins <= 1)
        throw AppError.conflict('This is the last active administrator; appoint another one first.');
      if (id === actingUserId && input.active === false)
        throw AppError.conflict('You cannot deactivate your own account.');
    }
    const before = { displayName: user.displayName, role: user.role, active: user.active };
    if (input.displayName !== undefined) user.displayName = input.displayName;
    if (input.role !== undefined) user.role = input.role as Role;
    if (input.active !== undefined) user.active = input.active;
    const after = { displayName: user.displayName, role: user.role, active: user.active };
    await this.audited(actor, async (manager) => {
      await manager.getRepository(User).save(user);
      return { value: undefined, entry: personChange(user.id, user.email, before, after) };
    });
    if (user.role !== before.role || user.active !== before.active)
      for (const listener of this.accessListeners) listener(user.id);
    return toPublicUser(user);
  }

  /**
   * Redeem a one-time invitation or reset token. The token is consumed by one conditional update (still
   * pending, not expired), so of several simultaneous uses exactly one succeeds. Afterwards every session
   * of that person ends, except `keepSessionId` (the request's own session when it is theirs).
   */
  async setPasswordWithToken(token: string, password: string, keepSessionId?: string): Promise<PublicUser> {
    const invalid = (): AppError =>
      AppError.badRequest('This link is invalid or has expired; ask an administrator for a new one.');
    const tokenHash = sha256(token);
    const user = await this.users.findOneBy({ setPasswordTokenHash: tokenHash });
    if (!user) throw invalid();
    const passwordHash = await hashPassword(password, this.hashRounds);
    const consumed = await this.users
      .createQueryBuilder()
      .update(User)
      .set({ passwordHash, setPasswordTokenHash: null, setPasswordExpiresAt: null })
      .where('id = :id', { id: user.id })
      .andWhere('set_password_token_hash = :tokenHash', { tokenHash })
      .andWhere('set_password_expires_at > :now', { now: Date.now() })
      .execute();
    if (consumed.affected !== 1) throw invalid();
    await this.sessions?.destroyAllOf(user.id, keepSessionId);
    return toPublicUser({ ...user, passwordHash, setPasswordTokenHash: null, setPasswordExpiresAt: null });
  }
}

type AuditEntryOf = { action: string; entityId: number; summary: string; before?: unknown; after?: unknown };
type PersonState = { displayName: string; role: Role; active: boolean };

/** The audit entry of a change to a person, or null when nothing changed. */
function personChange(
  id: number,
  email: string,
  before: PersonState,
  after: PersonState,
): AuditEntryOf | null {
  const parts: string[] = [];
  let action = 'update';
  if (before.active !== after.active) {
    action = after.active ? 'reactivate' : 'deactivate';
    parts.push(after.active ? 'reactivated' : 'deactivated');
  }
  if (before.role !== after.role) {
    if (action === 'update') action = 'change_role';
    parts.push(`role ${before.role} → ${after.role}`);
  }
  if (before.displayName !== after.displayName)
    parts.push(`name "${before.displayName}" → "${after.displayName}"`);
  if (!parts.length) return null;
  return { action, entityId: id, summary: `${email}: ${parts.join(', ')}`, before, after };
}
