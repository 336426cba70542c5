import { Initial1764600000000 } from './1764600000000-initial';

/** Every migration, oldest first. Add new ones at the end. */
export const migrations = [Initial1764600000000];
