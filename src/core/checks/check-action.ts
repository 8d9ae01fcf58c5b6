/** What a check does when it fires: fail the gate, warn, or not run at all. Declared once, here. */
export type CheckAction = 'block' | 'warn' | 'off'
