// Moved to lib/vocabulary/protocol.ts (a leaf module, so lib/db may import it). Kept only for the
// three desk components (components/desk/*), which another branch is editing: delete this file
// once their imports read '@/lib/vocabulary/protocol'.
export { labelName, noiseKindName } from '@/lib/vocabulary/protocol';
