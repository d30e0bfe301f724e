package main

import (
	"github.com/spf13/cobra"
)

var completionShells = []string{"bash", "zsh", "fish", "powershell"}

type completionOptions struct {
	IO    *IOStreams
	Shell string
	Root  *cobra.Command
}

func newCompletionCmd(f *Factory, runF func(*completionOptions) error) *cobra.Command {
	opts := &completionOptions{IO: f.IO}
	cmd := &cobra.Command{
		Use:   "completion bash|zsh|fish|powershell",
		Short: "Print a shell completion script",
		Long: `Print a script that makes the shell complete plumb's commands and flags.

bash:  source <(plumb completion bash)
zsh:   plumb completion zsh > "${fpath[1]}/_plumb"
fish:  plumb completion fish > ~/.config/fish/completions/plumb.fish`,
		Example:   `  plumb completion bash > plumb.bash`,
		Args:      exactArgs("SHELL"),
		ValidArgs: completionShells,
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Shell = args[0]
			opts.Root = cmd.Root()
			if runF != nil {
				return runF(opts)
			}
			return runCompletion(opts)
		},
	}
	return cmd
}

func runCompletion(opts *completionOptions) error {
	w := opts.IO.Out
	switch opts.Shell {
	case "bash":
		return opts.Root.GenBashCompletionV2(w, true)
	case "zsh":
		return opts.Root.GenZshCompletion(w)
	case "fish":
		return opts.Root.GenFishCompletion(w, true)
	case "powershell":
		return opts.Root.GenPowerShellCompletionWithDesc(w)
	}
	return usagef("unknown shell %q: use one of bash, zsh, fish, powershell", opts.Shell)
}
