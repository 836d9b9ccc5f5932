type Props = React.ButtonHTMLAttributes<HTMLButtonElement> & { variant?: "primary" | "quiet" | "danger" };

const styles = {
  primary: "bg-accent text-white hover:bg-accent-strong",
  quiet: "border border-line-strong bg-paper-raised text-ink hover:bg-paper-sunken",
  danger: "border border-danger text-danger hover:bg-danger-soft",
};

export function Button({ variant = "primary", className = "", ...rest }: Props) {
  return <button {...rest} className={`inline-flex items-center gap-1.5 rounded-md px-3 py-1.5 text-sm font-medium disabled:opacity-50 ${styles[variant]} ${className}`} />;
}
