import { Command as Cmdk } from 'cmdk'

// Thin, styled wrappers so the palette reads like the rest of the console.
export function CommandDialog({
  open,
  onOpenChange,
  children,
  label,
  value,
  onValueChange,
}: {
  open: boolean
  onOpenChange: (open: boolean) => void
  children: React.ReactNode
  label: string
  value?: string
  onValueChange?: (value: string) => void
}) {
  return (
    <Cmdk.Dialog
      open={open}
      onOpenChange={onOpenChange}
      label={label}
      value={value}
      onValueChange={onValueChange}
      shouldFilter={false}
      loop
      data-slot="command-dialog"
      overlayClassName="fixed inset-0 z-40 bg-ink/30"
      contentClassName="fixed inset-x-3 top-[12vh] z-50 mx-auto max-w-xl overflow-hidden rounded-md border border-line-strong bg-panel shadow-2xl"
    >
      {children}
    </Cmdk.Dialog>
  )
}

export function CommandInput(props: React.ComponentProps<typeof Cmdk.Input>) {
  return (
    <Cmdk.Input
      data-slot="command-input"
      className="w-full border-b border-line bg-transparent px-4 py-3 text-base text-ink outline-none placeholder:text-ink-faint"
      {...props}
    />
  )
}

export function CommandList(props: React.ComponentProps<typeof Cmdk.List>) {
  return <Cmdk.List data-slot="command-list" className="max-h-[60vh] overflow-y-auto p-1.5" {...props} />
}

export function CommandGroup(props: React.ComponentProps<typeof Cmdk.Group>) {
  return (
    <Cmdk.Group
      data-slot="command-group"
      className="[&_[cmdk-group-heading]]:px-2.5 [&_[cmdk-group-heading]]:pt-2 [&_[cmdk-group-heading]]:pb-1 [&_[cmdk-group-heading]]:text-[0.7rem] [&_[cmdk-group-heading]]:font-medium [&_[cmdk-group-heading]]:tracking-wide [&_[cmdk-group-heading]]:text-ink-faint [&_[cmdk-group-heading]]:uppercase"
      {...props}
    />
  )
}

export function CommandItem({ className = '', ...props }: React.ComponentProps<typeof Cmdk.Item>) {
  return (
    <Cmdk.Item
      data-slot="command-item"
      className={`flex cursor-default items-center justify-between gap-3 rounded-sm px-2.5 py-2 text-sm text-ink data-[selected=true]:bg-accent-soft data-[selected=true]:text-ink ${className}`}
      {...props}
    />
  )
}

export function CommandEmpty(props: React.ComponentProps<typeof Cmdk.Empty>) {
  return <Cmdk.Empty data-slot="command-empty" className="px-3 py-6 text-center text-sm text-ink-soft" {...props} />
}

export function Kbd({ children }: { children: React.ReactNode }) {
  return <kbd className="rounded-sm border border-line-strong bg-sunken px-1.5 py-0.5 font-mono text-[0.7rem] text-ink-soft">{children}</kbd>
}
