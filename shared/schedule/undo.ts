/**
 * How long the desk can undo a move (the toast's Undo) before the instructor is told of it. The
 * "Moved" e-mail waits this long, and a move undone within it sends nothing.
 */
export const UNDO_WINDOW_MS = 20_000;
