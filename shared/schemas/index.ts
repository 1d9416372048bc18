/** Every request-body schema shared by client and server. */
export * from './auth';
export * from './club';
export * from './invitation';
export * from './password-reset';
