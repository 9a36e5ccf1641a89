import { useMutation } from '@tanstack/react-query';
import { ptaRequestSchema, type JobAccepted, type PtaRequest } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';

export const startPtaInputSchema = ptaRequestSchema;
export type StartPtaInput = Partial<PtaRequest> & Pick<PtaRequest, 'regimen'>;

/** POST /api/courses/:id/pta — 202 with a job to poll. */
export const startPta = (courseId: string, input: StartPtaInput) =>
  apiSend<JobAccepted>(`/api/courses/${courseId}/pta`, 'POST', input);

export const useStartPta = (courseId: string) =>
  useMutation({ mutationFn: (input: StartPtaInput) => startPta(courseId, input) });
