import { useMutation, useQueryClient } from '@tanstack/react-query';
import {
  fhirImportRequestSchema,
  type FhirImportRequest,
  type FhirImportResponse,
} from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterDoseChange } from '../../doses/api/invalidate';
import { invalidateAfterLevelChange } from '../../levels/api/invalidate';

export const importFhirInputSchema = fhirImportRequestSchema;
export type ImportFhirInput = FhirImportRequest;

/** POST /api/imports/fhir — a FHIR R4 Bundle; preview first, commit is all-or-nothing. */
export const importFhir = (input: ImportFhirInput) =>
  apiSend<FhirImportResponse>('/api/imports/fhir', 'POST', input);

export const useImportFhir = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ImportFhirInput) => importFhir(importFhirInputSchema.parse(input)),
    onSuccess: (result) =>
      result.committed
        ? Promise.all([
            invalidateAfterDoseChange(queryClient, courseId),
            invalidateAfterLevelChange(queryClient, courseId),
          ])
        : undefined,
  });
};
