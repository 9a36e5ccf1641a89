import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SimulateRequest, SimulateResponse } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';

export type SimulateParams = Partial<SimulateRequest>;

/** POST /api/courses/:id/simulate — the predicted curve over the recorded doses. */
export const simulateCourse = (courseId: string, params: SimulateParams) =>
  apiSend<SimulateResponse>(`/api/courses/${courseId}/simulate`, 'POST', params);

export const simulationQueryOptions = (courseId: string, params: SimulateParams = {}) =>
  queryOptions({
    queryKey: ['simulations', 'detail', courseId, params],
    queryFn: () => simulateCourse(courseId, params),
  });

export const useSimulation = (courseId: string, params: SimulateParams, enabled: boolean) =>
  useQuery({ ...simulationQueryOptions(courseId, params), enabled });
