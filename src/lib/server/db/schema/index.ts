export * from './auth';
export * from './register';
export * from './activity';
export * from './work-orders';
export * from './office';
