! expect: line 8: incomplete: 2 of 3 numbers
[Version] 2.0
# MHz S MA
[Number of Ports] 1
[Number of Frequencies] 2
[Network Data]
7.0 0.5 10
7.1 0.5
[End]
