package analysis

import "os"

// noFMAKernelEnv reports whether PCQC_NO_FMA_KERNEL is set.
func noFMAKernelEnv() bool { return os.Getenv("PCQC_NO_FMA_KERNEL") != "" }
