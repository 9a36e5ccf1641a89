import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CsvImportKind, CsvImportResponse, CsvMapping } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';
import { invalidateAfterDoseChange } from '../../doses/api/invalidate';
import { invalidateAfterLevelChange } from '../../levels/api/invalidate';

export interface CsvImportInput {
  file: File;
  kind: CsvImportKind;
  mapping?: CsvMapping;
  mode: 'preview' | 'commit';
}

/** POST /api/courses/:id/imports/csv (multipart): preview marks refused rows; commit is all-or-nothing. */
export const importCsv = (courseId: string, input: CsvImportInput) => {
  const body = new FormData();
  body.set('file', input.file);
  body.set('kind', input.kind);
  body.set('mode', input.mode);
  if (input.mapping) body.set('mapping', JSON.stringify(input.mapping));
  return apiFetch<CsvImportResponse>(`/api/courses/${courseId}/imports/csv`, {
    method: 'POST',
    body,
  });
};

export const useImportCsv = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CsvImportInput) => importCsv(courseId, input),
    onSuccess: (result) => {
      if (!result.committed) return;
      return result.kind === 'doses'
        ? invalidateAfterDoseChange(queryClient, courseId)
        : invalidateAfterLevelChange(queryClient, courseId);
    },
  });
};
