import { useEffect, useRef } from 'react';

/** A `<dialog>` shown modally while `open` is true (Escape and the close button end it through its onClose). */
export function useModalDialog(open: boolean) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return ref;
}
