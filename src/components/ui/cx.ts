/** joins class names, skipping falsy ones */
export const cx = (...parts: Array<string | false | null | undefined>) => parts.filter(Boolean).join(' ');
