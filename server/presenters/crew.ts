/** A crew → CrewDto. */
import type { CrewDto } from '../../shared/schemas/setup';

export interface CrewRow {
  id: string;
  company_id: string;
  company_name: string;
  name: string;
  unit_count: string | number;
  version: number;
}

export function presentCrew(row: CrewRow): CrewDto {
  return {
    id: row.id,
    companyId: row.company_id,
    companyName: row.company_name,
    name: row.name,
    unitCount: Number(row.unit_count),
    version: row.version,
  };
}
