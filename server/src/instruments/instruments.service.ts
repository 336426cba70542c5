import type { DataSource, Repository } from 'typeorm';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import { type ParseRules, resolveParseRules } from '../parsers';
import { InstrumentProfile, type ProfileRules } from './instrument-profile.entity';
import { hashInstrumentToken, issueInstrumentToken } from './instrument-token';
import type { ProfileDto, ProfileWithToken } from '../contracts/instruments';
import { type CreateProfileInput, type UpdateProfileInput, rulesSchema } from '../contracts/instruments';

export type { ProfileDto, ProfileWithToken };

export function profileRules(profile: InstrumentProfile): ProfileRules {
  return rulesSchema.parse(JSON.parse(profile.rulesJson));
}

export function toProfileDto(profile: InstrumentProfile): ProfileDto {
  return {
    id: profile.id,
    name: profile.name,
    kind: profile.kind,
    plateFormat: profile.plateFormat,
    fileFormat: profile.fileFormat,
    rules: profileRules(profile),
    pathLengthCm: profile.pathLengthCm,
    fillVolumeUl: profile.fillVolumeUl,
    wellDiameterMm: profile.wellDiameterMm,
    defaultWavelengthNm: profile.defaultWavelengthNm,
    dropSubfolder: profile.dropSubfolder,
    fileNamePattern: profile.fileNamePattern,
    active: profile.active,
    hasToken: profile.tokenHash !== null,
    tokenPrefix: profile.tokenHash ? profile.tokenPrefix : null,
    tokenCreatedAt: profile.tokenHash ? profile.tokenCreatedAt : null,
    createdAt: new Date(profile.createdAt).toISOString(),
    updatedAt: new Date(profile.updatedAt).toISOString(),
  };
}

/** The parser's rules for a profile's files. */
/**
 * The parsing rules a profile gives, worked out once per distinct profile settings: every stored file asks
 * for them, and checking the stored rules against their schema cost a tenth of storing a plate. The
 * answer is shared: callers read it and do not change it.
 */
export function parseRulesOf(profile: InstrumentProfile): ParseRules {
  const key = [profile.fileFormat, profile.plateFormat, profile.defaultWavelengthNm, profile.rulesJson].join(
    '|',
  );
  let resolved = resolvedRules.get(key);
  if (!resolved) {
    resolved = resolveParseRules({
      ...profileRules(profile),
      format: profile.fileFormat,
      plateFormat: profile.plateFormat,
      defaultWavelengthNm: profile.defaultWavelengthNm ?? undefined,
    });
    // A lab has a handful of profiles; a long-running process that saw many edits starts afresh.
    if (resolvedRules.size >= 200) resolvedRules.clear();
    resolvedRules.set(key, resolved);
  }
  return resolved;
}
const resolvedRules = new Map<string, ParseRules>();

/** The run id a profile's file-name pattern gives for a file name, if any. */
export function runIdFromFileName(pattern: string | null, fileName: string): string | undefined {
  if (!pattern) return undefined;
  const match = new RegExp(pattern).exec(fileName);
  if (!match) return undefined;
  return match.groups?.['run'] ?? match[1] ?? match[0];
}

/** Instrument profiles and their tokens. */
export class InstrumentsService {
  private readonly profiles: Repository<InstrumentProfile>;

  constructor(
    dataSource: DataSource,
    private readonly audit?: AuditService,
  ) {
    this.profiles = dataSource.getRepository(InstrumentProfile);
  }

  private async record(
    actor: Actor | undefined,
    action: string,
    profile: InstrumentProfile,
    summary: string,
    before?: unknown,
    after?: unknown,
  ) {
    if (!actor || !this.audit) return;
    await this.audit.record({
      actor,
      action,
      entity: 'instrument_profile',
      entityId: profile.id,
      summary,
      before,
      after,
    });
  }

  async list(): Promise<ProfileDto[]> {
    return (await this.profiles.find({ order: { name: 'ASC' } })).map(toProfileDto);
  }

  async get(id: number): Promise<InstrumentProfile> {
    const profile = await this.profiles.findOneBy({ id });
    if (!profile) throw AppError.notFound(`No instrument profile with id ${id}.`);
    return profile;
  }

  /** The active profile an instrument token belongs to, or undefined. */
  async findByToken(token: string): Promise<InstrumentProfile | undefined> {
    const profile = await this.profiles.findOneBy({ tokenHash: hashInstrumentToken(token) });
    return profile && profile.active ? profile : undefined;
  }

  private async assertUnique(name: string | undefined, dropSubfolder: string | undefined, exceptId?: number) {
    for (const [field, value, label] of [
      ['name', name, 'name'],
      ['dropSubfolder', dropSubfolder, 'drop sub-folder'],
    ] as const) {
      if (value === undefined) continue;
      const other = await this.profiles.findOneBy({ [field]: value });
      if (other && other.id !== exceptId)
        throw AppError.conflict(`Another instrument profile already uses the ${label} "${value}".`);
    }
  }

  async create(input: CreateProfileInput, actor?: Actor): Promise<ProfileWithToken> {
    await this.assertUnique(input.name, input.dropSubfolder);
    const issued = issueInstrumentToken();
    const { rules, ...fields } = input;
    const profile = this.profiles.create({
      ...fields,
      rulesJson: JSON.stringify(rules),
      tokenHash: issued.hash,
      tokenPrefix: issued.prefix,
      tokenCreatedAt: new Date().toISOString(),
    });
    this.checkRules(profile);
    await this.profiles.save(profile);
    const dto = toProfileDto(profile);
    await this.record(
      actor,
      'create',
      profile,
      `Created instrument profile "${profile.name}" with a new token`,
      undefined,
      dto,
    );
    return { profile: dto, token: issued.token };
  }

  async update(id: number, input: UpdateProfileInput, actor?: Actor): Promise<ProfileDto> {
    const profile = await this.get(id);
    const before = toProfileDto(profile);
    await this.assertUnique(input.name, input.dropSubfolder, id);
    const { rules, ...fields } = input;
    Object.assign(profile, Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== undefined)));
    if (rules) {
      const merged = {
        ...profileRules(profile),
        ...rules,
        columns: { ...profileRules(profile).columns, ...rules.columns },
      };
      profile.rulesJson = JSON.stringify(rulesSchema.parse(merged));
    }
    if (profile.kind === 'cuvette_spectrophotometer' && profile.plateFormat !== 'cuvette') {
      throw AppError.badRequest(
        'Invalid request: plateFormat: a cuvette spectrophotometer uses the cuvette sequence format',
      );
    }
    this.checkRules(profile);
    await this.profiles.save(profile);
    const after = toProfileDto(profile);
    await this.record(
      actor,
      'update',
      profile,
      `Changed instrument profile "${profile.name}"`,
      before,
      after,
    );
    return after;
  }

  /** Refuse rule sets the parser cannot work with, with its own message. */
  private checkRules(profile: InstrumentProfile): void {
    try {
      parseRulesOf(profile);
    } catch (err) {
      throw AppError.badRequest(`Invalid parsing rules: ${(err as Error).message}`);
    }
  }

  async rotateToken(id: number, actor?: Actor): Promise<ProfileWithToken> {
    const profile = await this.get(id);
    const issued = issueInstrumentToken();
    profile.tokenHash = issued.hash;
    profile.tokenPrefix = issued.prefix;
    profile.tokenCreatedAt = new Date().toISOString();
    await this.profiles.save(profile);
    await this.record(
      actor,
      'rotate-token',
      profile,
      `Issued a new token for "${profile.name}"; the old one no longer works`,
    );
    return { profile: toProfileDto(profile), token: issued.token };
  }

  async revokeToken(id: number, actor?: Actor): Promise<ProfileDto> {
    const profile = await this.get(id);
    profile.tokenHash = null;
    profile.tokenPrefix = null;
    profile.tokenCreatedAt = null;
    await this.profiles.save(profile);
    await this.record(actor, 'revoke-token', profile, `Revoked the token of "${profile.name}"`);
    return toProfileDto(profile);
  }
}
