export const E2E_PORT = 8791;
export const E2E_DATABASE = 'sympodia_e2e';
