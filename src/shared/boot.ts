/**
 * The app's page carries `{ me }` (the answer of GET /api/session) in a JSON script element
 * with this id, so the first screen knows who is signed in without a request of its own.
 */
export const BOOT_ELEMENT_ID = 'sympodia-session';

/**
 * The collection this browser works in, kept in a cookie as well as in local storage, so
 * the server can name that collection's records among the page's preloads.
 */
export const CURRENT_COLLECTION_COOKIE = 'sympodia_collection';
