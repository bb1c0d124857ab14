import { useNavigate, useSearchParams } from 'react-router-dom';
import { Wordmark } from '@/components/ui/wordmark';
import { landingFor } from '@/config/paths';
import { SignInForm } from '@/features/auth/components/sign-in-form';
import { usePageTitle } from '@/hooks/use-page-title';

export default function SignInPage() {
  usePageTitle('Sign in');
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const next = params.get('next');

  return (
    <div className="grid min-h-screen lg:grid-cols-[1.1fr_1fr]">
      <div className="hidden flex-col justify-between bg-matrix-900 p-12 text-matrix-100 lg:flex">
        <Wordmark light />
        <div className="max-w-md">
          <p className="text-2xl font-semibold leading-snug text-white">
            Respiratory-chain enzyme workups, from specimen receipt to a signed report.
          </p>
          <p className="mt-4 text-sm text-matrix-200">
            Kinetic traces, specific activities, citrate synthase ratios and the laboratory&apos;s own reference
            intervals, each number traceable to its inputs.
          </p>
        </div>
        <p className="text-xs text-matrix-300">For authorised laboratory staff and referring clinicians.</p>
      </div>
      <div className="flex items-center justify-center p-8">
        <div className="w-full max-w-sm">
          <div className="mb-8 lg:hidden">
            <Wordmark />
          </div>
          <h1 className="mb-1 text-xl font-semibold text-matrix-900">Sign in</h1>
          <p className="mb-6 text-sm text-ink-soft">Use the account your laboratory gave you.</p>
          <SignInForm
            onSignedIn={(user) => navigate(next && next.startsWith('/') && !next.startsWith('//') ? next : landingFor[user.role], { replace: true })}
          />
        </div>
      </div>
    </div>
  );
}
