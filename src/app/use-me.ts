import { useOutletContext } from 'react-router-dom';
import type { Me } from '../../shared/schemas/staff';

/** The signed-in person, provided by the signed-in layout. */
export const useSignedIn = () => useOutletContext<Me>();
