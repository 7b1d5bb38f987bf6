/** The software version written into manifests and sidecars (package.json "version"). */
import pkg from '@/package.json';

export const SOFTWARE_VERSION: string = (pkg as { version?: string }).version ?? '0.0.0';
