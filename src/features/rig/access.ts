import { useSignedIn } from '../../app/use-me';

/**
 * PRODUCT.md §2: riggers and the owner edit rooms, points, gear and load paths; retiring,
 * quarantining and recording events take a rigger. Everyone signed in reads. The server enforces
 * this; the pages only hide what a person cannot do.
 */
export function useRigAccess() {
  const me = useSignedIn();
  return { canEdit: me.role === 'rigger' || me.role === 'owner', isRigger: me.role === 'rigger' };
}
