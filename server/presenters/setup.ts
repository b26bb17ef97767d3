/** Job set-up records → the JSON shapes of shared/schemas/setup.ts: one presenter file per resource. */
export { presentJobDetail } from './job';
export { presentLevel, presentLevelPlan } from './level';
export { presentSpace } from './space';
export { presentSystem } from './system';
export { presentUnitModel } from './unitModel';
export { presentUnit } from './unit';
export { presentJobCompany } from './company';
export { presentMember } from './member';
export { presentCatalogueItem } from './catalogue';
