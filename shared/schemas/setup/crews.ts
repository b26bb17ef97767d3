/**
 * Crews: named teams within a company on a job. Units record which crew installed them, and
 * recurring defects are broken down by crew (a habit belongs to a crew).
 *
 * GET    /jobs/:jobId/crews?companyId=    all roles; a subcontractor sees their own company's crews only
 * POST   /jobs/:jobId/crews               GC manager (any company on the job), subcontractor (own company) → 201 CrewDto
 * PATCH  /jobs/:jobId/crews/:crewId       same roles, If-Match → CrewDto
 * DELETE /jobs/:jobId/crews/:crewId       same roles, If-Match → 204; 409 `referenced` while units name it
 * A crew name is unique within its company on the job, ignoring case (409 `duplicate`).
 */
import { z } from 'zod';
import { id, text } from './fields';

export const CREW_NAME_MAX = 80;
const crewName = text('a crew name', CREW_NAME_MAX);

export const createCrewSchema = z.object({ companyId: id('company'), name: crewName }).strict();
export type CreateCrewInput = z.input<typeof createCrewSchema>;
export const updateCrewSchema = z.object({ name: crewName }).strict();
export type UpdateCrewInput = z.input<typeof updateCrewSchema>;
/** Crews of a job are few (a handful per company): the list is not paged. */
export const crewListQuerySchema = z.object({ companyId: id('company id').optional() }).strict();
export type CrewListQuery = z.input<typeof crewListQuerySchema>;
export const crewParamsSchema = z.object({ jobId: id('job id'), crewId: id('crew id') }).strict();

export interface CrewDto {
  id: string;
  companyId: string;
  companyName: string;
  name: string;
  /** Units of the job that name this crew as their installer. */
  unitCount: number;
  version: number;
}

/** GET /crews: the crews, and for a subcontractor the one company whose crews they see and manage. */
export interface CrewListResponse {
  items: CrewDto[];
  nextCursor: null;
  /** The caller's company for a subcontractor (only its crews are listed, only it can be chosen), else null. */
  companyScope: string | null;
}

/** How a crew is named where its company is not shown beside it: "Northwind Mechanical · Blue crew". */
export function crewLabel(crew: { companyName: string; name: string }): string {
  return `${crew.companyName} · ${crew.name}`;
}
