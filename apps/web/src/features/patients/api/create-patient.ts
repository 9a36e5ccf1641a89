import { useMutation, useQueryClient } from '@tanstack/react-query';
import { patientCreateSchema, type Patient, type PatientCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { patientsQueryOptions } from './get-patients';

export const createPatientInputSchema = patientCreateSchema;
export type CreatePatientInput = PatientCreate;

/** POST /api/patients */
export const createPatient = (input: CreatePatientInput) =>
  apiSend<Patient>('/api/patients', 'POST', input);

export const useCreatePatient = () => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createPatient,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: patientsQueryOptions().queryKey }),
  });
};
