/** Job set-up records → the JSON shapes of shared/schemas/setup.ts (never res.json(model)). */
import { CODE_DOCUMENTS } from '../../shared/catalogue/types';
import { DEFAULT_EDITIONS } from '../../shared/calc/limits';
import {
  DEFAULT_RECURRING_THRESHOLDS,
  DEFAULT_SEVERITY_DUE_DAYS,
  type CatalogueItemDto,
  type JobCompanyDto,
  type JobDetail,
  type LevelDto,
  type MemberDto,
  type SpaceDto,
  type SystemDto,
  type UnitDto,
  type UnitModelDto,
} from '../../shared/schemas/setup';
import type { LevelPlanDto } from '../../shared/schemas/board';
import type { Role } from '../../shared/words';
import type { CatalogueItem, Company, Job, JobCompany, JobMember, Level, Space, System, Unit, UnitModel, User } from '../models';

export function presentJobDetail(job: Job, role: Role): JobDetail {
  const chosen = job.codeEditions ?? {};
  return {
    id: job.id,
    name: job.name,
    number: job.number ?? null,
    address: job.address ?? null,
    role,
    startsOn: job.startsOn ?? null,
    endsOn: job.endsOn ?? null,
    timeZone: job.timeZone,
    unitSystem: job.unitSystem,
    codeEditions: Object.fromEntries(CODE_DOCUMENTS.map((d) => [d, chosen[d] ?? DEFAULT_EDITIONS[d]])) as JobDetail['codeEditions'],
    severityDueDays: { ...DEFAULT_SEVERITY_DUE_DAYS, ...(job.severityDueDays ?? {}) },
    recurringThresholds: { ...DEFAULT_RECURRING_THRESHOLDS, ...(job.recurringThresholds ?? {}) },
    settings: job.settings ?? {},
    version: job.version,
  };
}

export function presentLevel(level: Level, counts: { spaces: number; units: number } = { spaces: 0, units: 0 }): LevelDto {
  return {
    id: level.id,
    name: level.name,
    position: level.position,
    spaceCount: counts.spaces,
    unitCount: counts.units,
    version: level.version,
    plan: presentLevelPlan(level),
  };
}

/** The level's plan metadata (issue 7), or null when it has none. */
export function presentLevelPlan(level: Level): LevelPlanDto | null {
  if (!level.planKey || !level.planContentType || !level.planWidth || !level.planHeight || !level.planUploadedAt) return null;
  return {
    contentType: level.planContentType,
    width: level.planWidth,
    height: level.planHeight,
    version: level.planVersion,
    uploadedAt: level.planUploadedAt.toISOString(),
  };
}

export function presentSpace(space: Space, extra: { levelName: string; linkedSpaceIds: string[]; unitCount: number }): SpaceDto {
  const volume = space.floorArea !== null && space.ceilingHeight !== null ? (space.floorArea * space.ceilingHeight) / 1000 : null;
  return {
    id: space.id,
    levelId: space.levelId,
    levelName: extra.levelName,
    name: space.name,
    floorArea: space.floorArea,
    ceilingHeight: space.ceilingHeight,
    volume,
    occupancy: space.occupancy,
    enclosed: space.enclosed,
    linkedSpaceIds: extra.linkedSpaceIds,
    unitCount: extra.unitCount,
    version: space.version,
  };
}

export function presentSystem(system: System, unitCount: number): SystemDto {
  return {
    id: system.id,
    name: system.name,
    outdoorModel: system.outdoorModel,
    refrigerant: system.refrigerant,
    factoryCharge: system.factoryCharge,
    fieldCharge: system.fieldCharge,
    totalCharge: (system.factoryCharge ?? 0) + (system.fieldCharge ?? 0),
    concentrationLimitOverride: system.concentrationLimitOverride,
    unitCount,
    version: system.version,
  };
}

export function presentUnitModel(model: UnitModel, unitCount: number): UnitModelDto {
  return {
    id: model.id,
    name: model.name,
    modelNumber: model.modelNumber,
    unitKind: model.unitKind,
    nominalCapacity: model.nominalCapacity,
    limits: model.limits ?? {},
    unitCount,
    version: model.version,
  };
}

/** A unit loaded with its level, space, system and model (see UNIT_INCLUDES). */
export function presentUnit(unit: Unit): UnitDto {
  return {
    id: unit.id,
    tag: unit.tag,
    kind: unit.kind,
    modelId: unit.modelId ?? null,
    modelName: unit.model?.name ?? null,
    capacity: unit.capacity,
    levelId: unit.levelId,
    levelName: unit.level?.name ?? '',
    spaceId: unit.spaceId ?? null,
    spaceName: unit.space?.name ?? null,
    systemId: unit.systemId ?? null,
    systemName: unit.system?.name ?? null,
    pinX: unit.pinX ?? null,
    pinY: unit.pinY ?? null,
    version: unit.version,
  };
}

export function presentJobCompany(link: JobCompany, company: Company, extra: { isOwner: boolean; memberCount: number }): JobCompanyDto {
  return {
    id: company.id,
    name: company.name,
    trades: link.trades,
    isOwner: extra.isOwner,
    memberCount: extra.memberCount,
    version: link.version,
  };
}

/** A member under the company their membership is for (member.company loaded), not their home company. */
export function presentMember(member: JobMember, user: User, showEmail: boolean): MemberDto {
  return {
    id: member.id,
    userId: user.id,
    name: user.name,
    role: member.role,
    companyId: member.companyId,
    companyName: member.company?.name ?? '',
    email: showEmail ? user.email : null,
  };
}

export function presentCatalogueItem(item: CatalogueItem): CatalogueItemDto {
  return {
    id: item.id,
    code: item.code,
    group: item.group,
    title: item.title,
    description: item.description,
    unitKinds: item.unitKinds,
    defaultSeverity: item.defaultSeverity,
    trade: item.trade,
    measuredRule: (item.measuredRule ?? null) as CatalogueItemDto['measuredRule'],
    fixGuidance: item.fixGuidance,
    caution: item.caution,
    needsCeilingAccess: item.needsCeilingAccess,
    builtin: item.builtin,
    retiredAt: item.retiredAt ? item.retiredAt.toISOString() : null,
    version: item.version,
  };
}
