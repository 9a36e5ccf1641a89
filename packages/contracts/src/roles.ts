import { z } from 'zod';

/** The four roles of BRIEF.md "Users and roles". */
export const roleSchema = z.enum(['pharmacist', 'reviewer', 'trainee', 'admin']);
export type Role = z.infer<typeof roleSchema>;
export const roles = roleSchema.options;
