// Input rules for people and accounts, shared by endpoints and forms (the same zod schemas run in the browser and on the server).
import { z } from 'zod';
import { ROLES } from '../vocab';

export const email = z.string({ required_error: 'is required' }).trim().toLowerCase().max(254, 'is too long (254 characters at most)').email('is not an e-mail address');
export const password = z
  .string({ required_error: 'is required' })
  .min(10, 'must be at least 10 characters')
  .max(200, 'is too long (200 characters at most)');
export const personName = z.string({ required_error: 'is required' }).trim().min(1, 'is required').max(120, 'is too long (120 characters at most)');
export const role = z.enum(ROLES, { errorMap: () => ({ message: `must be one of ${ROLES.join(', ')}` }) });
