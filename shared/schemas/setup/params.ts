/**
 * Path parameters of the set-up routes.
 */
import { z } from 'zod';
import { id } from './fields';

export const jobParamsSchema = z.object({ jobId: id('job id') }).strict();
export const levelParamsSchema = z.object({ jobId: id('job id'), levelId: id('level id') }).strict();
export const spaceParamsSchema = z.object({ jobId: id('job id'), spaceId: id('space id') }).strict();
export const systemParamsSchema = z.object({ jobId: id('job id'), systemId: id('system id') }).strict();
export const modelParamsSchema = z.object({ jobId: id('job id'), modelId: id('model id') }).strict();
export const unitParamsSchema = z.object({ jobId: id('job id'), unitId: id('unit id') }).strict();
export const companyParamsSchema = z.object({ jobId: id('job id'), companyId: id('company id') }).strict();
export const memberParamsSchema = z.object({ jobId: id('job id'), memberId: id('member id') }).strict();
export const catalogueItemParamsSchema = z.object({ jobId: id('job id'), itemId: id('item id') }).strict();
