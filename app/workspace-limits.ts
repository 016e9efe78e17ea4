/** Field limits of workspace items, shared by the forms (client) and the server checks. */
export const TITLE_MAX = 200;
export const NOTES_MAX = 20_000;
