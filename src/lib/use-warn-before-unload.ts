import { useEffect } from 'react';

/** While `dirty`, a reload or closing the tab asks first, so typed data is never lost silently. */
export function useWarnBeforeUnload(dirty: boolean) {
  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty]);
}
