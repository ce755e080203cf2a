/** Schemas for the cue library as the server sends it and the device stores it. */
import { z } from 'zod';
import { phaseSchema } from '../cues';

export const cueSchema = z.object({
  id: z.uuid(),
  phase: phaseSchema,
  label: z.string(),
  sortOrder: z.number().int(),
  archived: z.boolean(),
});
export type Cue = z.infer<typeof cueSchema>;
