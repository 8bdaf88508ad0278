// Package locale gives the process a UTF-8 English locale when the
// environment names none or the POSIX locale ("C", "C.UTF-8"), before the GUI toolkit's
// package initialisation reads it; otherwise every headless command would
// print the toolkit's "Error parsing user locale C". It is imported for its
// side effect by package main. Go initialises packages in import-path order
// among those whose dependencies are ready, and this path sorts before the
// toolkit's, while it depends on nothing but os.
package locale

import "os"

func init() {
	for _, k := range []string{"LC_ALL", "LC_MESSAGES", "LANG"} {
		if v := os.Getenv(k); v != "" && !isPOSIX(v) {
			return
		}
	}
	os.Setenv("LANG", "en_US.UTF-8")
	for _, k := range []string{"LC_ALL", "LC_MESSAGES"} {
		if isPOSIX(os.Getenv(k)) {
			os.Unsetenv(k)
		}
	}
}

// isPOSIX reports whether v names the POSIX locale, with or without an
// encoding ("C", "C.UTF-8", "POSIX").
func isPOSIX(v string) bool {
	for i := 0; i < len(v); i++ {
		if v[i] == '.' || v[i] == '@' {
			v = v[:i]
			break
		}
	}
	return v == "C" || v == "POSIX"
}
