'use client';
/** The signed-in person's role on the page, so components can hide what the role may not do (the server refuses it anyway). */
import { createContext, useContext } from 'react';
import { may, type Action, type Role } from '@/server/auth/roles';

const RoleContext = createContext<Role | null>(null);

export function RoleProvider({ role, children }: { role: Role | null; children: React.ReactNode }) {
  return <RoleContext.Provider value={role}>{children}</RoleContext.Provider>;
}

export const useRole = () => useContext(RoleContext);

export function useMay(action: Action): boolean {
  return may(useContext(RoleContext), action);
}

/** Renders its children only when the role may do the action. */
export function IfMay({ action, children, otherwise = null }: { action: Action; children: React.ReactNode; otherwise?: React.ReactNode }) {
  return <>{useMay(action) ? children : otherwise}</>;
}
