import { z } from 'zod';
import { listQuery } from '@/lib/list-query';
import { MACHINE_SORTS } from '@/lib/fleet/machines';

export { machineInput, machinePatch } from '@/lib/fleet/machines';
export const machineListQuery = listQuery(MACHINE_SORTS, 'model');
export const machineParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
