import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Job } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/jobs/:id — polled until the job has finished. */
export const getJob = (jobId: string) => apiFetch<Job>(`/api/jobs/${jobId}`);

const finished = (job: Job | undefined) =>
  job !== undefined && ['completed', 'failed', 'cancelled'].includes(job.state);

export const jobQueryOptions = (jobId: string) =>
  queryOptions({
    queryKey: ['jobs', 'detail', jobId],
    queryFn: () => getJob(jobId),
    refetchInterval: (query) => (finished(query.state.data) ? false : 700),
  });

export const useJob = (jobId: string | null) =>
  useQuery({ ...jobQueryOptions(jobId ?? ''), enabled: !!jobId });
