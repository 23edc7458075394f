// Request-time kernels take small stackalloc buffers that are always written before they are read;
// skipping the zero-fill keeps a plan from paying for memory it overwrites anyway.
[module: System.Runtime.CompilerServices.SkipLocalsInit]
