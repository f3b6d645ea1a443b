"""timespec: timing requirements solved into standard-value parts."""
