import { useEffect } from 'react';

/** The browser tab's title for a page: "What – Parallax" (restored when the page goes away). */
export function useDocumentTitle(title: string | null | undefined) {
  useEffect(() => {
    if (!title) return;
    const before = document.title;
    document.title = `${title} – Parallax`;
    return () => { document.title = before; };
  }, [title]);
}
