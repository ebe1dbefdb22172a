/* sh_main.c - placeholder entry point until the shell lands. */
#include <stdio.h>
int main(void) { puts("hone"); return 0; }
