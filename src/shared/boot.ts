/**
 * The app's page carries what it was drawn from (who is signed in, the collection, the first
 * screen's API answers: `PageData`) in a JSON script element with this id, so the browser's
 * first draw matches the server's and asks for nothing the page already holds.
 */
export const BOOT_ELEMENT_ID = 'sympodia-page';

/** The global the page server puts the same data in for the one server render in progress. */
export const PAGE_DATA_GLOBAL = '__sympodiaPageData';

/**
 * The collection this browser works in, kept in a cookie as well as in local storage, so
 * the server can draw the page in that collection.
 */
export const CURRENT_COLLECTION_COOKIE = 'sympodia_collection';

/** Whether this browser's window last had the wide layout (`1`) or the phone's (`0`), so the server draws the page in it. */
export const WIDE_LAYOUT_COOKIE = 'sympodia_wide';
