import type * as z from 'zod';
import type {
  FileStatusDto,
  PresenceDto,
  WatchedFolders,
  WatcherCredentialDto,
  heartbeatSchema,
} from '../contracts/watchers';
import crypto from 'node:crypto';
import { type DataSource, In, IsNull, Not, type Repository } from 'typeorm';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import { IntakeFile, type IntakeStatus } from '../ingest/intake-file.entity';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { hashInstrumentToken } from '../instruments/instrument-token';
import type { InstrumentsService } from '../instruments/instruments.service';
import { watcherBackMail, watcherSilentMail } from '../mail/mail-templates';
import type { MailService } from '../mail/mail.service';
import { User } from '../users/user.entity';
import { InstrumentPresence, WatcherCredential } from './watcher-credential.entity';

const WATCHER_TOKEN_PREFIX = 'eqw_';

/** A new random watcher credential (`eqw_…`). Like instrument tokens, only its SHA-256 is stored. */
export function issueWatcherToken(): { token: string; hash: string; prefix: string } {
  const token = `${WATCHER_TOKEN_PREFIX}${crypto.randomBytes(32).toString('base64url')}`;
  return { token, hash: hashInstrumentToken(token), prefix: token.slice(0, 10) };
}

/** A token from `Authorization: Bearer …`: a watcher credential (eqw_) or an instrument token (eqt_). */
export function bearerOf(
  header: string | undefined,
): { kind: 'watcher' | 'instrument'; token: string } | undefined {
  const match = /^Bearer\s+((eq[wt])_[A-Za-z0-9_-]{20,100})\s*$/.exec(header ?? '');
  if (!match) return undefined;
  return { kind: match[2] === 'eqw' ? 'watcher' : 'instrument', token: match[1]! };
}

/** Who is calling a watcher route: a watcher credential, or a watcher configured with one instrument's token. */
export type WatcherCaller =
  { kind: 'watcher'; credential: WatcherCredential } | { kind: 'instrument'; profile: InstrumentProfile };

export type HeartbeatInput = z.infer<typeof heartbeatSchema>;

const FINAL: readonly IntakeStatus[] = ['stored', 'duplicate', 'quarantined', 'unassigned'];

function toDto(c: WatcherCredential): WatcherCredentialDto {
  return {
    id: c.id,
    name: c.name,
    tokenPrefix: c.tokenPrefix,
    createdAt: c.createdAt,
    revokedAt: c.revokedAt,
    lastSeenAt: c.lastSeenAt,
    version: c.version,
    hostname: c.hostname,
    folders: c.foldersJson ? (JSON.parse(c.foldersJson) as string[]) : [],
  };
}

/**
 * Watcher credentials, the folders a watcher is told to watch, its reports ("presence") and the mails
 * when an active instrument's watcher goes silent and comes back.
 */
export class WatchersService {
  private readonly credentials: Repository<WatcherCredential>;
  private readonly presence: Repository<InstrumentPresence>;
  private readonly profiles: Repository<InstrumentProfile>;
  private timer: NodeJS.Timeout | undefined;
  private checking: Promise<void> = Promise.resolve();

  constructor(
    private readonly dataSource: DataSource,
    private readonly instruments: InstrumentsService,
    private readonly audit: AuditService,
    private readonly mail: MailService,
    private readonly options: { silentMs: number; publicUrl: string; log: (m: string, e?: unknown) => void },
  ) {
    this.credentials = dataSource.getRepository(WatcherCredential);
    this.presence = dataSource.getRepository(InstrumentPresence);
    this.profiles = dataSource.getRepository(InstrumentProfile);
  }

  // ── credentials (admins) ─────────────────────────────────────────────────────────────────────────

  async list(): Promise<WatcherCredentialDto[]> {
    return (await this.credentials.find({ order: { name: 'ASC' } })).map(toDto);
  }

  async create(name: string, actor: Actor): Promise<{ watcher: WatcherCredentialDto; token: string }> {
    if (await this.credentials.findOneBy({ name }))
      throw AppError.conflict(`Another watcher credential is already called "${name}".`);
    const issued = issueWatcherToken();
    return this.dataSource.transaction(async (manager) => {
      const row = manager.create(WatcherCredential, {
        name,
        tokenHash: issued.hash,
        tokenPrefix: issued.prefix,
        createdById: actor.id,
        createdAt: new Date().toISOString(),
        revokedAt: null,
        lastSeenAt: null,
        version: null,
        hostname: null,
        foldersJson: null,
      });
      await manager.save(row);
      await this.audit.record(
        {
          actor,
          action: 'create',
          entity: 'watcher',
          entityId: row.id,
          summary: `Created the watcher credential "${name}"`,
          after: { name, tokenPrefix: issued.prefix },
        },
        manager,
      );
      return { watcher: toDto(row), token: issued.token };
    });
  }

  async revoke(id: number, actor: Actor): Promise<WatcherCredentialDto> {
    return this.dataSource.transaction(async (manager) => {
      const row = await manager.findOneBy(WatcherCredential, { id });
      if (!row) throw AppError.notFound(`No watcher credential with id ${id}.`);
      if (row.revokedAt) return toDto(row);
      row.revokedAt = new Date().toISOString();
      await manager.save(row);
      await this.audit.record(
        {
          actor,
          action: 'revoke',
          entity: 'watcher',
          entityId: id,
          summary: `Revoked the watcher credential "${row.name}"; that watcher can no longer send files`,
        },
        manager,
      );
      return toDto(row);
    });
  }

  // ── the watcher's own calls ──────────────────────────────────────────────────────────────────────

  /** The caller behind a Bearer header, or undefined (unknown, revoked, or an inactive profile's token). */
  async authenticate(header: string | undefined): Promise<WatcherCaller | undefined> {
    const bearer = bearerOf(header);
    if (!bearer) return undefined;
    if (bearer.kind === 'instrument') {
      const profile = await this.instruments.findByToken(bearer.token);
      return profile ? { kind: 'instrument', profile } : undefined;
    }
    const credential = await this.credentials.findOneBy({
      tokenHash: hashInstrumentToken(bearer.token),
      revokedAt: IsNull(),
    });
    return credential ? { kind: 'watcher', credential } : undefined;
  }

  /** The active profile whose drop sub-folder is `folder` (a watcher credential sends files by folder). */
  async activeProfileForFolder(folder: unknown): Promise<InstrumentProfile> {
    if (typeof folder !== 'string' || !folder.trim())
      throw AppError.badRequest('Name the drop sub-folder of the file in the form field "folder".');
    const profile = await this.profiles.findOneBy({ dropSubfolder: folder.trim() });
    if (!profile || !profile.active)
      throw new AppError(
        'profile_inactive',
        409,
        `No active instrument profile uses the drop folder "${folder.trim().slice(0, 80)}"; the file waits.`,
      );
    return profile;
  }

  async watchedFolders(): Promise<WatchedFolders> {
    const active = await this.profiles.find({ where: { active: true }, order: { dropSubfolder: 'ASC' } });
    const folders = active.map((p) => ({
      profileId: p.id,
      name: p.name,
      folder: p.dropSubfolder,
      kind: p.kind,
      fileFormat: p.fileFormat,
      fileNamePattern: p.fileNamePattern,
    }));
    const revision = crypto.createHash('sha256').update(JSON.stringify(folders)).digest('hex').slice(0, 16);
    return { revision, folders };
  }

  /**
   * A watcher reports itself: its version and the folders it watches. A credential's report covers the
   * active profiles among those folders; an instrument token's covers its own profile.
   */
  async heartbeat(caller: WatcherCaller, input: HeartbeatInput): Promise<{ profiles: number[] }> {
    const now = new Date().toISOString();
    let profiles: InstrumentProfile[];
    let watcherName: string;
    let watcherId: number | null = null;
    if (caller.kind === 'watcher') {
      const c = caller.credential;
      await this.credentials.update(
        { id: c.id },
        {
          lastSeenAt: now,
          version: input.version,
          hostname: input.hostname ?? null,
          foldersJson: JSON.stringify(input.folders),
        },
      );
      profiles = input.folders.length
        ? await this.profiles.findBy({ dropSubfolder: In(input.folders), active: true })
        : [];
      watcherName = c.name;
      watcherId = c.id;
    } else {
      profiles = input.folders.includes(caller.profile.dropSubfolder) ? [caller.profile] : [];
      watcherName = 'instrument token';
    }
    const back: Array<{ profile: InstrumentProfile }> = [];
    for (const profile of profiles) {
      const before = await this.presence.findOneBy({ profileId: profile.id });
      await this.presence.save(
        this.presence.create({
          profileId: profile.id,
          watcherName,
          watcherId,
          version: input.version,
          hostname: input.hostname ?? null,
          lastSeenAt: now,
          silentNotifiedAt: before?.silentNotifiedAt ?? null,
        }),
      );
      if (before?.silentNotifiedAt) {
        // Claim the "back" notice once, even if two reports arrive together.
        const claimed = await this.presence.update(
          { profileId: profile.id, silentNotifiedAt: Not(IsNull()) },
          { silentNotifiedAt: null },
        );
        if (claimed.affected === 1) back.push({ profile });
      }
    }
    if (back.length) {
      const admins = await this.admins();
      for (const { profile } of back) {
        for (const admin of admins) {
          this.mail.send(
            admin.email,
            watcherBackMail(admin.displayName, {
              instrument: profile.name,
              folder: profile.dropSubfolder,
              watcherName,
              lastSeenAt: now,
              url: `${this.options.publicUrl}/instruments`,
            }),
          );
        }
      }
    }
    return { profiles: profiles.map((p) => p.id) };
  }

  /** A received file's state, for the watcher that sent it (an instrument token sees its own profile's files only). */
  async fileStatus(caller: WatcherCaller, id: number): Promise<FileStatusDto> {
    const file = await this.dataSource.getRepository(IntakeFile).findOneBy({ id });
    if (!file || (caller.kind === 'instrument' && file.profileId !== caller.profile.id))
      throw AppError.notFound(`No received file with id ${id}.`);
    return {
      id: file.id,
      status: file.status,
      error: file.status === 'quarantined' ? file.error : null,
      duplicateOfId: file.duplicateOfId,
    };
  }

  static isFinal(status: IntakeStatus): boolean {
    return FINAL.includes(status);
  }

  // ── presence and silence ─────────────────────────────────────────────────────────────────────────

  async presenceList(now = Date.now()): Promise<PresenceDto[]> {
    const rows = await this.presence.find({ order: { profileId: 'ASC' } });
    return rows.map((r) => ({
      profileId: r.profileId,
      watcherName: r.watcherName,
      version: r.version,
      hostname: r.hostname,
      lastSeenAt: r.lastSeenAt,
      silent: r.silentNotifiedAt !== null || now - Date.parse(r.lastSeenAt) > this.options.silentMs,
    }));
  }

  /**
   * Mail the admins once about each active instrument whose watcher has been silent longer than
   * INSTRUMENT_SILENT_MINUTES (claimed by a conditional update, so never twice). Profiles no watcher
   * ever reported for are left alone: nothing was watching them to fall silent.
   */
  checkSilence(now = Date.now()): Promise<void> {
    this.checking = this.checking
      .then(() => this.checkSilenceNow(now))
      .catch((err: unknown) => {
        this.options.log('Could not check for silent watchers', err);
      });
    return this.checking;
  }

  private async checkSilenceNow(now: number): Promise<void> {
    const cutoff = new Date(now - this.options.silentMs).toISOString();
    const rows = await this.presence
      .createQueryBuilder('p')
      .innerJoin(InstrumentProfile, 'i', 'i.id = p.profile_id')
      .where('p.silent_notified_at IS NULL')
      .andWhere('p.last_seen_at < :cutoff', { cutoff })
      .andWhere('i.active = :active', { active: true })
      .getMany();
    if (!rows.length) return;
    const at = new Date(now).toISOString();
    let admins: User[] | undefined;
    for (const row of rows) {
      const claimed = await this.presence.update(
        { profileId: row.profileId, silentNotifiedAt: IsNull(), lastSeenAt: row.lastSeenAt },
        { silentNotifiedAt: at },
      );
      if (claimed.affected !== 1) continue;
      const profile = await this.profiles.findOneBy({ id: row.profileId });
      if (!profile) continue;
      admins ??= await this.admins();
      for (const admin of admins) {
        this.mail.send(
          admin.email,
          watcherSilentMail(admin.displayName, {
            instrument: profile.name,
            folder: profile.dropSubfolder,
            watcherName: row.watcherName,
            lastSeenAt: row.lastSeenAt,
            silentMinutes: Math.round((this.options.silentMs / 60_000) * 10) / 10,
            url: `${this.options.publicUrl}/instruments`,
          }),
        );
      }
    }
  }

  private admins(): Promise<User[]> {
    return this.dataSource
      .getRepository(User)
      .find({ where: { role: 'admin', active: true }, order: { id: 'ASC' } });
  }

  /** Check for silence every minute (more often when the limit is shorter, as in tests). */
  start(): void {
    if (this.timer) return;
    const every = Math.min(60_000, Math.max(200, Math.floor(this.options.silentMs / 4)));
    this.timer = setInterval(() => void this.checkSilence(), every);
    this.timer.unref();
  }

  async stop(): Promise<void> {
    clearInterval(this.timer);
    this.timer = undefined;
    await this.checking;
  }
}

export type { FileStatusDto, PresenceDto, WatchedFolders, WatcherCredentialDto };
