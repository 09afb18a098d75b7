! A version 2.0 file without the extension that would state its ports.
[Version] 2.0
# GHz S RI R 50
[Number of Ports] 2
[Two-Port Data Order] 21_12
[Number of Frequencies] 2
[Network Data]
1 0.1 0 0.9 0 0.9 0 0.1 0
2 0.1 0 0.9 0 0.9 0 0.1 0
[End]
