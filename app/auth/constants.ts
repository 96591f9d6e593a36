/** Sign-in and sharing limits shown in the interface and enforced on the server. */
export const CODE_VALID_MINUTES = 10;
export const MAX_CODE_ATTEMPTS = 5;
export const INVITE_DAYS = 7;
