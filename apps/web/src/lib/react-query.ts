import { QueryClient, type DefaultOptions } from '@tanstack/react-query';

export const queryConfig = {
  queries: {
    retry: false,
    refetchOnWindowFocus: false,
    staleTime: 1000 * 30,
  },
} satisfies DefaultOptions;

export const createQueryClient = () => new QueryClient({ defaultOptions: queryConfig });
