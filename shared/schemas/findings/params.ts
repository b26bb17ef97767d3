/**
 * Path parameters of the walk, check, finding and photo routes.
 */
import { z } from 'zod';
import { id } from './fields';

export const walkParamsSchema = z.object({ jobId: id('job id'), walkId: id('walk id') }).strict();
export const checkUnitParamsSchema = z.object({ jobId: id('job id'), unitId: id('unit id') }).strict();
export const walkLevelParamsSchema = z.object({ jobId: id('job id'), levelId: id('level id') }).strict();
export const findingParamsSchema = z.object({ jobId: id('job id'), findingId: id('finding id') }).strict();
export const photoParamsSchema = z.object({ jobId: id('job id'), photoId: id('photo id') }).strict();
