import { useMemo } from 'react';
import { useQuery } from '@tanstack/react-query';
import { studioQueries } from '../settings/api';
import { studioFormat } from './format';

/** The studio's policy and the formatting that follows from it (time zone, display unit). */
export function useStudioFormat() {
  const studio = useQuery(studioQueries.detail());
  const fmt = useMemo(() => (studio.data ? studioFormat(studio.data.policy) : null), [studio.data]);
  return { studio, fmt };
}
