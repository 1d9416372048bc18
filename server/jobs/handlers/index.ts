/** Every job type the workers know. */
import type { JobHandler } from '../types';
import { clipProcessHandler } from './clip-process';
import { flightFitHandler } from './flight-fit';
import { flightFollowHandler } from './flight-follow';

export const JOB_HANDLERS: readonly JobHandler[] = [clipProcessHandler, flightFollowHandler, flightFitHandler];
