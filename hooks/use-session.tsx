import { useQueryClient } from '@tanstack/react-query';
import {
  createContext,
  useCallback,
  useContext,
  useEffect,
  useMemo,
  useRef,
  useState,
  useSyncExternalStore,
  type ReactNode,
} from 'react';
import { apiRequest } from '@/hooks/api/api-client';
import { PROGRAM_KEY, TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { readItem, writeItem } from '@/hooks/api/storage';
import { useMeQuery } from '@/hooks/queries/me';
import { API } from '@/shared/api/paths';
import { SignInResponseSchema, type Program, type SignInResponse, type User } from '@/shared/schemas/auth';

export type SessionStatus = 'signed-out' | 'loading' | 'ready' | 'error';

export type Session = {
  status: SessionStatus;
  token: string | null;
  user: User | null;
  programs: Program[];
  currentProgramId: string | null;
  currentProgram: Program | null;
  meError: unknown;
  /** True after the person pressed Sign out (as opposed to an expired or rejected token). */
  signedOutByUser: boolean;
  retryMe: () => void;
  setCurrentProgram: (programId: string) => void;
  signIn: (email: string, password: string) => Promise<User>;
  /** Store a session answered by sign-in or set-password. */
  adopt: (session: SignInResponse) => void;
  signOut: () => void;
};

const SessionContext = createContext<Session | null>(null);

const noServerToken = () => null;

export function SessionProvider({ children }: { children: ReactNode }) {
  const queryClient = useQueryClient();
  const token = useSyncExternalStore(sessionStore.subscribe, sessionStore.getToken, noServerToken);
  const me = useMeQuery({ enabled: Boolean(token) });
  const [storedProgramId, setStoredProgramId] = useState<string | null>(() => readItem(PROGRAM_KEY));
  const [signedOutByUser, setSignedOutByUser] = useState(false);

  // Whoever ends the session (sign-out, a 401, another tab), nothing cached may outlive it.
  const previousToken = useRef(token);
  useEffect(() => {
    if (previousToken.current && previousToken.current !== token) queryClient.clear();
    previousToken.current = token;
  }, [token, queryClient]);

  useEffect(() => {
    if (typeof window === 'undefined' || typeof window.addEventListener !== 'function') return;
    const onStorage = (event: StorageEvent) => {
      if (event.key === TOKEN_KEY || event.key === null) sessionStore.reload();
      if (event.key === PROGRAM_KEY) setStoredProgramId(event.newValue);
    };
    window.addEventListener('storage', onStorage);
    return () => window.removeEventListener('storage', onStorage);
  }, []);

  const programs = useMemo(() => (token ? (me.data?.programs ?? []) : []), [token, me.data]);
  const currentProgram = programs.find((program) => program.id === storedProgramId) ?? programs[0] ?? null;

  const setCurrentProgram = useCallback((programId: string) => {
    writeItem(PROGRAM_KEY, programId);
    setStoredProgramId(programId);
  }, []);

  const adopt = useCallback(
    (session: SignInResponse) => {
      queryClient.clear();
      setSignedOutByUser(false);
      sessionStore.setToken(session.token);
    },
    [queryClient],
  );

  const signIn = useCallback(
    async (email: string, password: string) => {
      const session = await apiRequest(API.signIn, {
        method: 'POST',
        body: { email, password },
        schema: SignInResponseSchema,
        auth: false,
      });
      adopt(session);
      return session.user;
    },
    [adopt],
  );

  const signOut = useCallback(() => {
    setSignedOutByUser(true);
    sessionStore.clear();
    queryClient.clear();
  }, [queryClient]);

  const { refetch } = me;
  const retryMe = useCallback(() => {
    void refetch();
  }, [refetch]);

  const status: SessionStatus = !token ? 'signed-out' : me.data ? 'ready' : me.isError ? 'error' : 'loading';

  const value = useMemo<Session>(
    () => ({
      status,
      token,
      user: token ? (me.data?.user ?? null) : null,
      programs,
      currentProgramId: currentProgram?.id ?? null,
      currentProgram,
      meError: me.error,
      signedOutByUser,
      retryMe,
      setCurrentProgram,
      signIn,
      adopt,
      signOut,
    }),
    [status, token, me.data, me.error, signedOutByUser, programs, currentProgram, retryMe, setCurrentProgram, signIn, adopt, signOut],
  );

  return <SessionContext.Provider value={value}>{children}</SessionContext.Provider>;
}

export function useSession(): Session {
  const session = useContext(SessionContext);
  if (!session) throw new Error('useSession must be used inside SessionProvider');
  return session;
}
