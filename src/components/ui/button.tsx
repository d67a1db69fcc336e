import type { ButtonHTMLAttributes, ReactNode } from 'react';
import { Spinner } from '@/components/ui/spinner';

const variants = {
  primary:
    'bg-ember text-ink hover:bg-ember-bright active:bg-ember-deep active:text-card shadow-[0_2px_0_0_var(--color-ember-deep)]',
  secondary: 'bg-card text-ink ring-1 ring-inset ring-line-strong hover:bg-paper-deep',
  quiet: 'bg-transparent text-ink hover:bg-paper-deep',
  danger: 'bg-card text-danger ring-1 ring-inset ring-danger/40 hover:bg-danger-wash',
  solidDanger: 'bg-danger text-card hover:bg-danger/90',
} as const;

const sizes = {
  sm: 'h-8 px-3 text-sm gap-1.5',
  md: 'h-10 px-4 text-[0.95rem] gap-2',
} as const;

export type ButtonVariant = keyof typeof variants;

export function buttonClasses(variant: ButtonVariant = 'primary', size: keyof typeof sizes = 'md', extra = '') {
  return `inline-flex items-center justify-center rounded-full font-bold whitespace-nowrap transition-colors disabled:cursor-not-allowed disabled:opacity-55 ${variants[variant]} ${sizes[size]} ${extra}`;
}

interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: ButtonVariant;
  size?: keyof typeof sizes;
  pending?: boolean;
  icon?: ReactNode;
}

export function Button({
  variant = 'primary',
  size = 'md',
  pending = false,
  icon,
  className = '',
  disabled,
  children,
  type = 'button',
  ...rest
}: ButtonProps) {
  return (
    <button
      type={type}
      className={buttonClasses(variant, size, className)}
      disabled={disabled || pending}
      aria-busy={pending || undefined}
      {...rest}
    >
      {pending ? <Spinner /> : icon}
      {children}
    </button>
  );
}
