export { startMailCatcher } from './catcher';
export type { CaughtMessage, MailCatcherOptions, RunningMailCatcher } from './catcher';
