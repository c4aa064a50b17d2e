/**
 * The app's page carries `{ me }` (the answer of GET /api/session) in a JSON script element
 * with this id, so the first screen knows who is signed in without a request of its own.
 */
export const BOOT_ELEMENT_ID = 'sympodia-session';
